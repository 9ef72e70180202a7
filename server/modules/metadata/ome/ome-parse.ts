import { XMLParser, XMLValidator } from 'fast-xml-parser'
import { BadRequestError } from '../../../errors/http-error'

export type XmlNode = Record<string, unknown>

/** Elements that may repeat, always read as arrays. */
const REPEATED = new Set([
  'Image',
  'Instrument',
  'Laser',
  'Arc',
  'Filament',
  'LightEmittingDiode',
  'GenericExcitationSource',
  'Detector',
  'Objective',
  'Channel',
  'Plane',
  'MapAnnotation',
  'M',
  'Filter',
  'Dichroic',
  'FilterSet',
  'TiffData',
  'BinData',
  'ROI',
  'AnnotationRef',
  'Experimenter',
  'Dataset',
  'Project',
])

export const MAX_OME_XML_BYTES = 2 * 1024 * 1024

/**
 * Parses an OME-XML document defensively. A document type declaration is refused outright: it is
 * how entity expansion ("billion laughs") and external entities (file or network reads) get in,
 * and OME-XML never needs one. Size is capped before parsing.
 */
export function parseOmeXml(xml: string): XmlNode {
  if (Buffer.byteLength(xml, 'utf8') > MAX_OME_XML_BYTES) {
    throw new BadRequestError(
      `The OME-XML document is larger than ${MAX_OME_XML_BYTES / 1024 / 1024} MB.`,
    )
  }
  if (/<!DOCTYPE|<!ENTITY/i.test(xml)) {
    throw new BadRequestError(
      'XML with a document type declaration or entities is refused (it could expand entities or read external files). OME-XML never needs one.',
    )
  }
  const valid = XMLValidator.validate(xml, { allowBooleanAttributes: true })
  if (valid !== true) {
    throw new BadRequestError(
      `Not well-formed XML: ${valid.err.msg} (line ${valid.err.line}, column ${valid.err.col}).`,
    )
  }
  const parser = new XMLParser({
    ignoreAttributes: false,
    attributeNamePrefix: '@',
    removeNSPrefix: true,
    // Safe now that no DOCTYPE can declare entities: only the five predefined ones and character references remain.
    processEntities: true,
    htmlEntities: false,
    parseAttributeValue: false,
    parseTagValue: false,
    trimValues: true,
    isArray: (name) => REPEATED.has(name),
  })
  const doc = parseOrRefuse(parser, xml)
  const ome = doc.OME
  if (!ome || typeof ome !== 'object')
    throw new BadRequestError('This XML document has no <OME> root element.')
  return ome as XmlNode
}

/** The parser's own refusals (nesting too deep, names that could pollute prototypes) are the sender's. */
function parseOrRefuse(parser: XMLParser, xml: string): XmlNode {
  try {
    return parser.parse(xml) as XmlNode
  } catch (err) {
    const reason = err instanceof Error ? err.message.replace(/^\[SECURITY\]\s*/, '') : ''
    throw new BadRequestError(
      /nested/i.test(reason)
        ? 'The XML nests elements too deeply to be read.'
        : /Invalid name/i.test(reason)
          ? `The XML uses a name that is refused: ${reason.replace(/^Invalid name:\s*/, '')}.`
          : 'The XML could not be read.',
    )
  }
}

export const children = (node: XmlNode | undefined, name: string): XmlNode[] => {
  const v = node?.[name]
  return Array.isArray(v) ? (v as XmlNode[]) : v && typeof v === 'object' ? [v as XmlNode] : []
}
export const child = (node: XmlNode | undefined, name: string): XmlNode | undefined =>
  children(node, name)[0]
export const attr = (node: XmlNode | undefined, name: string): string | undefined => {
  const v = node?.[`@${name}`]
  return typeof v === 'string' ? v : undefined
}

/** Every element path (and attribute) in the document, for reporting what was not used. */
export function collectPaths(node: XmlNode, prefix: string, out: Map<string, number>) {
  for (const [key, value] of Object.entries(node)) {
    if (key === '#text') continue
    if (key.startsWith('@')) {
      if (key.startsWith('@xmlns') || key === '@schemaLocation') continue
      const path = `${prefix}@${key.slice(1)}`
      out.set(path, (out.get(path) ?? 0) + 1)
      continue
    }
    const list = Array.isArray(value) ? value : [value]
    for (const item of list) {
      const path = `${prefix}${prefix ? '/' : ''}${key}`
      if (item && typeof item === 'object') collectPaths(item as XmlNode, path, out)
      else out.set(path, (out.get(path) ?? 0) + 1)
    }
  }
}
