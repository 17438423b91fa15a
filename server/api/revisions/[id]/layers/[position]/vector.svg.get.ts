export default revisionLayerFileHandler('vector')
