import { metadataSchema, type DatasetMetadata } from '@shared/metadata/metadata.schema'
import { OME_LIGHT_SOURCE_KINDS } from '@shared/metadata/ome-terms'
import { getPath, setPath } from './metadata-paths'
import { illuminationFromOme, STIPPLE_MAP_NAMESPACE, techniqueFromOme } from './ome-mapping'
import { attr, child, children, collectPaths, parseOmeXml, type XmlNode } from './ome-parse'
import { OME_DEFAULT_UNITS, toStippleUnit, type Quantity } from './units'

export interface ImportReport {
  metadata: DatasetMetadata
  mapped: { path: string; from: string; value: unknown }[]
  ignored: { from: string; reason: string }[]
}

/** Identifiers, references and image geometry: structure, not information a description loses. */
const STRUCTURAL =
  /@ID$|Ref(@|$)|^@Creator$|^Image\/Pixels@(DimensionOrder|Type|Size[XYZC]|BigEndian|Interleaved|SignificantBits)$|^Image\/Pixels\/(MetadataOnly|BinData|TiffData)|^Image\/Pixels\/Plane@The[ZTC]$|^StructuredAnnotations\/MapAnnotation\/Description$/

class Mapper {
  readonly doc: DatasetMetadata = {}
  readonly mapped = new Map<string, { from: string; value: unknown }>()
  readonly ignored: ImportReport['ignored'] = []
  readonly used = new Set<string>()

  put(path: string, value: unknown, from: string) {
    if (value === undefined || value === '') return
    setPath(this.doc, path, value)
    this.mapped.set(path, { from, value })
    this.used.add(from)
  }

  /** A text attribute taken as it is. */
  text(path: string, node: XmlNode | undefined, name: string, from: string) {
    this.put(path, attr(node, name), `${from}@${name}`)
  }

  /** A numeric attribute with an optional unit attribute (`…Unit`), converted to our unit. */
  number(
    path: string,
    node: XmlNode | undefined,
    name: string,
    from: string,
    quantity?: Quantity,
    defaultUnit?: string,
  ) {
    const raw = attr(node, name)
    if (raw === undefined) return
    const value = Number(raw)
    if (!Number.isFinite(value))
      return void this.ignored.push({ from: `${from}@${name}`, reason: `"${raw}" is not a number` })
    if (!quantity) return this.put(path, value, `${from}@${name}`)
    const unit = attr(node, `${name}Unit`) ?? defaultUnit ?? ''
    const converted = toStippleUnit(value, unit, quantity)
    if (converted === null)
      return void this.ignored.push({
        from: `${from}@${name}`,
        reason: `the unit "${unit}" cannot be converted`,
      })
    this.used.add(`${from}@${name}Unit`)
    this.put(path, converted, `${from}@${name}`)
  }
}

function findById(nodes: XmlNode[], id: string | undefined): XmlNode | undefined {
  return (id ? nodes.find((n) => attr(n, 'ID') === id) : undefined) ?? nodes[0]
}

function mapInstrument(m: Mapper, ome: XmlNode, image: XmlNode | undefined) {
  const instrument = findById(
    children(ome, 'Instrument'),
    attr(child(image, 'InstrumentRef'), 'ID'),
  )
  if (!instrument) return
  if (image && child(image, 'InstrumentRef')) m.used.add('Image/InstrumentRef')
  const microscope = child(instrument, 'Microscope')
  m.text('instrument.microscopeType', microscope, 'Type', 'Instrument/Microscope')
  m.text('instrument.microscopeModel', microscope, 'Model', 'Instrument/Microscope')

  const objective = findById(
    children(instrument, 'Objective'),
    attr(child(image, 'ObjectiveSettings'), 'ID'),
  )
  const o = 'Instrument/Objective'
  m.number('instrument.objective.nominalMagnification', objective, 'NominalMagnification', o)
  m.number('instrument.objective.lensNA', objective, 'LensNA', o)
  m.text('instrument.objective.immersion', objective, 'Immersion', o)
  m.text('instrument.objective.correction', objective, 'Correction', o)
  m.text('instrument.objective.model', objective, 'Model', o)

  let index = 0
  for (const kind of OME_LIGHT_SOURCE_KINDS) {
    for (const source of children(instrument, kind)) {
      const at = `instrument.lightSources.${index++}`
      const from = `Instrument/${kind}`
      m.put(`${at}.kind`, kind, from)
      m.number(
        `${at}.wavelengthNm`,
        source,
        'Wavelength',
        from,
        'length',
        OME_DEFAULT_UNITS.wavelength,
      )
      m.number(`${at}.powerMw`, source, 'Power', from, 'power', OME_DEFAULT_UNITS.power)
      if (kind === 'Laser') {
        m.text(`${at}.laserType`, source, 'Type', from)
        m.text(`${at}.pulse`, source, 'Pulse', from)
      }
    }
  }

  const firstChannel = children(child(image, 'Pixels'), 'Channel')[0]
  const detector = findById(
    children(instrument, 'Detector'),
    attr(child(firstChannel, 'DetectorSettings'), 'ID'),
  )
  const d = 'Instrument/Detector'
  m.text('instrument.detector.type', detector, 'Type', d)
  m.text('instrument.detector.model', detector, 'Model', d)
  m.number('instrument.detector.offsetAdu', detector, 'Offset', d)
  m.number('instrument.detector.emGain', detector, 'AmplificationGain', d)
}

function mapImage(m: Mapper, image: XmlNode | undefined) {
  const pixels = child(image, 'Pixels')
  if (!pixels) return
  const p = 'Image/Pixels'
  m.number(
    'instrument.detector.pixelSizeNm',
    pixels,
    'PhysicalSizeX',
    p,
    'length',
    OME_DEFAULT_UNITS.physicalSize,
  )
  m.number('acquisition.frames', pixels, 'SizeT', p)
  m.number(
    'acquisition.frameIntervalMs',
    pixels,
    'TimeIncrement',
    p,
    'time',
    OME_DEFAULT_UNITS.time,
  )
  const plane = children(pixels, 'Plane')[0]
  m.number(
    'acquisition.exposureTimeMs',
    plane,
    'ExposureTime',
    `${p}/Plane`,
    'time',
    OME_DEFAULT_UNITS.time,
  )
  const channel = children(pixels, 'Channel')[0]
  const c = `${p}/Channel`
  m.number(
    'acquisition.emissionWavelengthNm',
    channel,
    'EmissionWavelength',
    c,
    'length',
    OME_DEFAULT_UNITS.wavelength,
  )
  const mode = attr(channel, 'AcquisitionMode')
  const type = attr(channel, 'IlluminationType')
  m.put('acquisition.technique', techniqueFromOme(mode), `${c}@AcquisitionMode`)
  m.put(
    'acquisition.illumination',
    illuminationFromOme(mode, type),
    mode === 'TIRF' || mode === 'TotalInternalReflection'
      ? `${c}@AcquisitionMode`
      : `${c}@IlluminationType`,
  )
  m.text('labelling.0.label', channel, 'Fluor', c)
}

/** Fields without an OME element travel in our key-value annotation; they win over native values. */
function mapAnnotations(m: Mapper, ome: XmlNode) {
  for (const annotation of children(child(ome, 'StructuredAnnotations'), 'MapAnnotation')) {
    if (attr(annotation, 'Namespace') !== STIPPLE_MAP_NAMESPACE) continue
    m.used.add('StructuredAnnotations/MapAnnotation@Namespace')
    for (const entry of children(child(annotation, 'Value'), 'M')) {
      const key = attr(entry, 'K')
      const raw = typeof entry['#text'] === 'string' ? entry['#text'] : ''
      m.used.add('StructuredAnnotations/MapAnnotation/Value/M@K')
      m.used.add('StructuredAnnotations/MapAnnotation/Value/M')
      if (!key) continue
      try {
        m.put(key, JSON.parse(raw), `StructuredAnnotations/MapAnnotation/Value/M[@K="${key}"]`)
      } catch {
        m.ignored.push({ from: `MapAnnotation key ${key}`, reason: 'the value is not valid JSON' })
      }
    }
  }
}

/** Drops mapped values the schema rejects (out of range, not in an enumeration), reporting why. */
function keepValid(m: Mapper) {
  for (let round = 0; round < 50; round++) {
    const result = metadataSchema.safeParse(m.doc)
    if (result.success) return
    for (const issue of result.error.issues) {
      const path = issue.path.join('.')
      const hit = [...m.mapped.keys()].find((p) => p === path || p.startsWith(`${path}.`)) ?? path
      const value = getPath(m.doc, hit)
      setPath(m.doc, hit, undefined)
      m.ignored.push({
        from: m.mapped.get(hit)?.from ?? hit,
        reason: `${JSON.stringify(value)} not accepted: ${issue.message}`,
      })
      m.mapped.delete(hit)
    }
  }
}

/**
 * Reads an OME-XML document (2016-06) into our metadata: instrument, objective, light sources,
 * detector, pixel size, frames, exposure and channel. Reports what was mapped from where, and
 * what was ignored and why.
 */
export function importOmeXml(xml: string): ImportReport {
  const ome = parseOmeXml(xml)
  const m = new Mapper()
  const image = children(ome, 'Image')[0]
  mapInstrument(m, ome, image)
  mapImage(m, image)
  mapAnnotations(m, ome)
  keepValid(m)
  const parsed = metadataSchema.parse(m.doc)

  const px = attr(child(image, 'Pixels'), 'PhysicalSizeX')
  if (px !== undefined && px === attr(child(image, 'Pixels'), 'PhysicalSizeY')) {
    m.used.add('Image/Pixels@PhysicalSizeY').add('Image/Pixels@PhysicalSizeYUnit')
  }
  const present = new Map<string, number>()
  collectPaths(ome, '', present)
  const reported = new Set(m.ignored.map((i) => i.from))
  for (const [path, n] of present) {
    if (m.used.has(path) || reported.has(path) || STRUCTURAL.test(path)) continue
    m.ignored.push({
      from: n > 1 ? `${path} (${n}×)` : path,
      reason: 'no place in Stipple’s metadata',
    })
  }
  return {
    metadata: parsed,
    mapped: [...m.mapped].map(([path, v]) => ({ path, ...v })),
    ignored: m.ignored,
  }
}
