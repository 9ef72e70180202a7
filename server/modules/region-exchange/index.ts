/** Exchange of a file's regions with other programs: GeoJSON in nm, and OME-XML ROIs. */
export { regionsToGeoJson, regionsFromGeoJson } from './geojson'
export { regionsToOmeXml, regionsFromOmeXml, omeColour, type OmeRoiFrame } from './ome-rois'
export { COORDINATE_CONVENTION, type ExchangeRegion, type ExchangeImport } from './exchange.types'
