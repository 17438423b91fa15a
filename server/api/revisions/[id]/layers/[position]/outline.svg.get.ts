export default revisionLayerFileHandler('outline')
