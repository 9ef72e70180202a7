/** One TiffData element: which IFDs of which file hold which planes. */
export interface TiffDataBlock {
  /** The UUID element's FileName, or null for "the file this OME-XML came from". */
  fileName: string | null
  uuid: string | null
  ifd: number
  /** Null when the block covers every IFD of the file from `ifd` on (schema default). */
  planeCount: number | null
  firstZ: number
  firstT: number
  firstC: number
  /** Linear index of the block's first plane in the image's dimension order. */
  firstPlane: number
}

export interface OmeImage {
  imageId: string
  dimensionOrder: string
  sizeX: number
  sizeY: number
  sizeZ: number
  sizeC: number
  sizeT: number
  /** SizeZ × SizeC × SizeT. */
  planes: number
  tiffData: TiffDataBlock[]
}

export interface OmeFilePart {
  fileName: string | null
  uuid: string | null
  ranges: { imageId: string; ifd: number; planeCount: number | null; firstPlane: number }[]
  /** The fewest IFDs the file must have for every range to exist; null when a range is open-ended. */
  minimumIfds: number | null
}

export interface OmeFileSet {
  /** The OME root's UUID: the identity of the file holding this document. */
  uuid: string | null
  /** Set when this file holds pixels only and its metadata lives in another file. */
  binaryOnly: { metadataFile: string; uuid: string } | null
  images: OmeImage[]
  /** Every file named by TiffData, in order of first mention. */
  files: OmeFilePart[]
}

export function filesOf(images: OmeImage[]): OmeFilePart[] {
  const parts = new Map<string, OmeFilePart>()
  for (const image of images) {
    for (const block of image.tiffData) {
      const key = block.fileName ?? block.uuid ?? ''
      let part = parts.get(key)
      if (!part) {
        part = { fileName: block.fileName, uuid: block.uuid, ranges: [], minimumIfds: 0 }
        parts.set(key, part)
      }
      const { ifd, planeCount, firstPlane } = block
      part.ranges.push({ imageId: image.imageId, ifd, planeCount, firstPlane })
      part.minimumIfds =
        part.minimumIfds === null || planeCount === null
          ? null
          : Math.max(part.minimumIfds, ifd + planeCount)
    }
  }
  return [...parts.values()]
}
