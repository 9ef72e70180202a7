/**
 * Rendering engine for previews: histogram and Gaussian renders of localizations onto a pixel
 * grid, colouring, the geometry of a zoomable tile pyramid, PNG encoding, and a canonical key
 * of the render options for caching tiles. Image row 0 is the smallest y (y grows downward).
 */
export { renderHistogram, renderValueHistogram, type ValueImage } from './histogram'
export {
  renderGaussian,
  renderGaussianDetailed,
  renderGaussianValue,
  type GaussianRender,
} from './gaussian'
export {
  GAUSSIAN_DEFAULTS,
  resolveGaussianOptions,
  type GaussianOptions,
  type ResolvedGaussianOptions,
} from './gaussian-options'
export { erf, normalCdf } from './normal-cdf'
export { isDrawableView, type RenderFilter, type RenderView } from './render-view'
export { COLORMAP_NAMES, colormapTable, isColormapName, type ColormapName } from './colormaps'
export {
  DEFAULT_CONTRAST_PERCENTILE,
  percentileOfPositive,
  resolveContrast,
  type ContrastSetting,
  type ResolvedContrast,
} from './contrast'
export {
  CHANNEL_COLOURS,
  COLOUR_DEFAULTS,
  colourIndices,
  colourize,
  colourizeByValue,
  overlayChannels,
  type ColourOptions,
  type OverlayOptions,
  type ValueColourOptions,
} from './colourize'
export {
  DEFAULT_FINEST_PIXEL_NM,
  DEFAULT_TILE_SIZE,
  pyramidFor,
  tileView,
  type BoundsNm,
  type TilePyramid,
} from './pyramid'
export { encodeIndexedPng, encodePng } from './png'
export {
  columnsDrawn,
  renderOptionsKey,
  resolveRenderOptions,
  type ColourBy,
  type RenderMethod,
  type RenderOptions,
  type ResolvedRenderOptions,
} from './render-options'
export {
  coloursDensity,
  finiteRange,
  renderImage,
  renderIndexedCounts,
  renderIndexedImage,
  type ImageScratch,
  type IndexedImage,
  type RenderedImage,
} from './render-image'
