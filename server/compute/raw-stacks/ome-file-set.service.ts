import { XMLParser, XMLValidator } from 'fast-xml-parser'
import { RawStackError } from './raw-stack.error'
import { type OmeFileSet, type OmeImage, type TiffDataBlock, filesOf } from './ome-file-set.types'
import { planeIndex } from './ome-plane.index'

type XmlNode = Record<string, unknown>

const REPEATED = new Set(['Image', 'TiffData'])

const parser = new XMLParser({
  ignoreAttributes: false,
  attributeNamePrefix: '@',
  removeNSPrefix: true,
  alwaysCreateTextNode: true,
  parseAttributeValue: false,
  parseTagValue: false,
  isArray: (name) => REPEATED.has(name),
})

function node(value: unknown): XmlNode | null {
  return typeof value === 'object' && value !== null && !Array.isArray(value)
    ? (value as XmlNode)
    : null
}

function nodes(value: unknown): XmlNode[] {
  if (!Array.isArray(value)) return []
  return value.map(node).filter((item): item is XmlNode => item !== null)
}

function text(value: unknown): string | null {
  return typeof value === 'string' ? value.trim() : null
}

/** A NonNegativeInt (or PositiveInt) attribute of the OME schema, or its default when absent. */
function integer(element: XmlNode, name: string, fallback: number | null): number | null {
  const raw = text(element[`@${name}`])
  if (raw === null) return fallback
  if (!/^\d+$/.test(raw))
    throw new RawStackError('malformed', `OME-XML: ${name}="${raw}" is not a whole number`)
  return Number(raw)
}

function tiffDataBlock(element: XmlNode, image: OmeImage): TiffDataBlock {
  const uuid = node(element.UUID)
  const ifd = integer(element, 'IFD', null)
  const block = {
    fileName: uuid ? text(uuid['@FileName']) : null,
    uuid: uuid ? text(uuid['#text']) || null : null,
    ifd: ifd ?? 0,
    // OME 2016-06: PlaneCount defaults to 1 when IFD is given, else to every IFD of the file.
    planeCount: integer(element, 'PlaneCount', ifd === null ? null : 1),
    firstZ: integer(element, 'FirstZ', 0) ?? 0,
    firstT: integer(element, 'FirstT', 0) ?? 0,
    firstC: integer(element, 'FirstC', 0) ?? 0,
  }
  return { ...block, firstPlane: planeIndex(image, block) }
}

function imageOf(element: XmlNode): OmeImage {
  const pixels = node(element.Pixels)
  if (!pixels) throw new RawStackError('malformed', 'OME-XML: an Image has no Pixels element')
  const size = (name: string) => integer(pixels, name, 1) ?? 1
  const image: OmeImage = {
    imageId: text(element['@ID']) ?? '',
    dimensionOrder: text(pixels['@DimensionOrder']) ?? 'XYZCT',
    sizeX: size('SizeX'),
    sizeY: size('SizeY'),
    sizeZ: size('SizeZ'),
    sizeC: size('SizeC'),
    sizeT: size('SizeT'),
    planes: 0,
    tiffData: [],
  }
  image.planes = image.sizeZ * image.sizeC * image.sizeT
  image.tiffData = nodes(pixels.TiffData).map((block) => tiffDataBlock(block, image))
  return image
}

function parseOme(omeXml: string): XmlNode {
  // No DOCTYPE means no custom entities: nothing can expand or reach outside the document.
  if (/<!DOCTYPE|<!ENTITY/i.test(omeXml)) {
    throw new RawStackError(
      'unsafe-xml',
      'OME-XML with a DOCTYPE or entity declarations is refused',
    )
  }
  const valid = XMLValidator.validate(omeXml)
  if (valid !== true) {
    const { msg, line } = valid.err
    throw new RawStackError('malformed', `OME-XML is not well-formed: ${msg} (line ${line})`)
  }
  const root = node(node(parser.parse(omeXml))?.OME)
  if (!root) throw new RawStackError('malformed', 'OME-XML has no OME root element')
  return root
}

/**
 * The files and IFD ranges a (possibly multi-file) OME-TIFF spreads its planes over, from the
 * TiffData elements of its OME-XML, so a caller can check that every part has arrived.
 */
export function resolveOmeFileSet(omeXml: string): OmeFileSet {
  const root = parseOme(omeXml)
  const binaryOnly = node(root.BinaryOnly)
  const images = nodes(root.Image).map(imageOf)
  return {
    uuid: text(root['@UUID']),
    binaryOnly: binaryOnly
      ? {
          metadataFile: text(binaryOnly['@MetadataFile']) ?? '',
          uuid: text(binaryOnly['@UUID']) ?? '',
        }
      : null,
    images,
    files: filesOf(images),
  }
}
