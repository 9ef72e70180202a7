/**
 * FFT area: in-place 2D complex FFT (unnormalized forward, 1/size² on inverse), two real images
 * through one complex transform, and circular cross-correlation with zero shift at the centre.
 */
export { fft2d, fft2dTransposed, isPowerOfTwo, transposeSquare, type FloatPlane } from './fft-2d'
export {
  mirrorIndex,
  splitPairSpectra,
  transformRealPair,
  type ComplexImage,
  type SplitSpectra,
} from './real-pair'
export { crossCorrelation2d } from './cross-correlation'
