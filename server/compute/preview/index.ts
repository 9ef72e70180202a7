/** Tiles of the zoomable preview, rendered from a localization store. */
export { renderTile, referenceScale, type ScaleTask, type TileTask } from './render-tile'
export { localizationsInBox } from './store-rows'
export {
  blockSide,
  drawsPlainCounts,
  OVERVIEW_FROM_ROWS,
  sharedOverview,
  type Overview,
} from './overview'
