export default revisionLayerFileHandler('prepared')
