/** The typed arrays a slot's values are stored in while a chunk is parsed and grouped. */
export type StoredArray =
  | Float32Array<ArrayBuffer>
  | Float64Array<ArrayBuffer>
  | Uint32Array<ArrayBuffer>
  | Uint16Array<ArrayBuffer>
