/** The naive recursive FFT of the fft-js package, used only as an independent cross-check. */
declare module 'fft-js' {
  type Complex = [number, number]
  export function fft(signal: Complex[] | number[]): Complex[]
  export function ifft(spectrum: Complex[]): Complex[]
}
