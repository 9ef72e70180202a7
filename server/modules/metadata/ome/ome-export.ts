import type { DatasetMetadata } from '@shared/metadata/metadata.schema'
import { escapeHtml as esc } from '../../../http/html-page'
import { leaves } from './metadata-paths'
import { acquisitionModeFor, illuminationTypeFor, STIPPLE_MAP_NAMESPACE } from './ome-mapping'

export interface ExportSubject {
  accession: string
  title: string
  description: string
}

/** Paths written as native OME elements or attributes; everything else goes to the annotation. */
const NATIVE = new Set([
  'instrument.microscopeType',
  'instrument.microscopeModel',
  'instrument.objective.nominalMagnification',
  'instrument.objective.lensNA',
  'instrument.objective.immersion',
  'instrument.objective.correction',
  'instrument.objective.model',
  'instrument.detector.type',
  'instrument.detector.model',
  'instrument.detector.offsetAdu',
  'instrument.detector.emGain',
  'instrument.detector.pixelSizeNm',
  'acquisition.frames',
  'acquisition.frameIntervalMs',
  'acquisition.exposureTimeMs',
  'acquisition.emissionWavelengthNm',
])
const NATIVE_LIGHT = /^instrument\.lightSources\.\d+\.(kind|wavelengthNm|powerMw|laserType|pulse)$/

const attrs = (pairs: [string, unknown][]) =>
  pairs
    .filter(([, v]) => v !== undefined && v !== null && v !== '')
    .map(([k, v]) => ` ${k}="${esc(String(v))}"`)
    .join('')

function instrumentXml(m: DatasetMetadata): string {
  const i = m.instrument ?? {}
  const lines = ['  <Instrument ID="Instrument:0">']
  if (i.microscopeType || i.microscopeModel)
    lines.push(
      `    <Microscope${attrs([
        ['Model', i.microscopeModel],
        ['Type', i.microscopeType],
      ])}/>`,
    )
  ;(i.lightSources ?? []).forEach((s, n) => {
    const kind = s.kind ?? 'GenericExcitationSource'
    const laser: [string, unknown][] =
      kind === 'Laser'
        ? [
            ['Type', s.laserType],
            ['Pulse', s.pulse],
          ]
        : []
    const wavelength: [string, unknown][] =
      kind === 'Laser'
        ? [
            ['Wavelength', s.wavelengthNm],
            ['WavelengthUnit', s.wavelengthNm === undefined ? undefined : 'nm'],
          ]
        : []
    lines.push(
      `    <${kind}${attrs([['ID', `LightSource:${n}`], ['Power', s.powerMw], ['PowerUnit', s.powerMw === undefined ? undefined : 'mW'], ...laser, ...wavelength])}/>`,
    )
  })
  const d = i.detector
  if (d)
    lines.push(
      `    <Detector${attrs([
        ['Model', d.model],
        ['Offset', d.offsetAdu],
        ['ID', 'Detector:0'],
        ['AmplificationGain', d.emGain],
        ['Type', d.type],
      ])}/>`,
    )
  const o = i.objective
  if (o) {
    lines.push(
      `    <Objective${attrs([
        ['Model', o.model],
        ['ID', 'Objective:0'],
        ['Correction', o.correction],
        ['Immersion', o.immersion],
        ['LensNA', o.lensNA],
        ['NominalMagnification', o.nominalMagnification],
      ])}/>`,
    )
  }
  lines.push('  </Instrument>')
  return lines.join('\n')
}

function imageXml(m: DatasetMetadata, subject: ExportSubject): string {
  const a = m.acquisition ?? {}
  const px = m.instrument?.detector?.pixelSizeNm
  const channel = attrs([
    ['ID', 'Channel:0:0'],
    ['Name', m.labelling?.[0]?.channel ?? m.labelling?.[0]?.label],
    ['AcquisitionMode', acquisitionModeFor(a.technique, a.illumination)],
    ['IlluminationType', illuminationTypeFor(a.illumination)],
    ['ContrastMethod', 'Fluorescence'],
    ['EmissionWavelength', a.emissionWavelengthNm],
    ['EmissionWavelengthUnit', a.emissionWavelengthNm === undefined ? undefined : 'nm'],
    ['Fluor', m.labelling?.[0]?.label],
  ])
  const firstLaser = (m.instrument?.lightSources ?? []).findIndex((s) => s.kind !== undefined)
  const channelBody = [
    firstLaser >= 0 ? `        <LightSourceSettings ID="LightSource:${firstLaser}"/>` : '',
    m.instrument?.detector ? '        <DetectorSettings ID="Detector:0"/>' : '',
  ].filter(Boolean)
  return [
    `  <Image${attrs([
      ['ID', 'Image:0'],
      ['Name', `${subject.accession} ${subject.title}`],
    ])}>`,
    subject.description ? `    <Description>${esc(subject.description)}</Description>` : '',
    '    <InstrumentRef ID="Instrument:0"/>',
    m.instrument?.objective ? '    <ObjectiveSettings ID="Objective:0"/>' : '',
    // The frame geometry is not part of the description; SizeX/SizeY 1 with MetadataOnly says so.
    `    <Pixels${attrs([
      ['ID', 'Pixels:0'],
      ['DimensionOrder', 'XYZCT'],
      ['Type', 'uint16'],
      ['SizeX', 1],
      ['SizeY', 1],
      ['SizeZ', 1],
      ['SizeC', 1],
      ['SizeT', a.frames ?? 1],
      ['PhysicalSizeX', px],
      ['PhysicalSizeXUnit', px === undefined ? undefined : 'nm'],
      ['PhysicalSizeY', px],
      ['PhysicalSizeYUnit', px === undefined ? undefined : 'nm'],
      ['TimeIncrement', a.frameIntervalMs],
      ['TimeIncrementUnit', a.frameIntervalMs === undefined ? undefined : 'ms'],
    ])}>`,
    channelBody.length
      ? `      <Channel${channel}>\n${channelBody.join('\n')}\n      </Channel>`
      : `      <Channel${channel}/>`,
    '      <MetadataOnly/>',
    a.exposureTimeMs !== undefined
      ? `      <Plane TheZ="0" TheT="0" TheC="0"${attrs([
          ['ExposureTime', a.exposureTimeMs],
          ['ExposureTimeUnit', 'ms'],
        ])}/>`
      : '',
    '    </Pixels>',
    '    <AnnotationRef ID="Annotation:0"/>',
    '  </Image>',
  ]
    .filter(Boolean)
    .join('\n')
}

/** Every field OME has no element for, as key-value pairs (key: dotted path, value: JSON). */
function annotationXml(m: DatasetMetadata): string {
  const entries = leaves(m).filter(([path]) => !NATIVE.has(path) && !NATIVE_LIGHT.test(path))
  const values = entries.map(([k, v]) => `        <M K="${esc(k)}">${esc(JSON.stringify(v))}</M>`)
  return [
    '  <StructuredAnnotations>',
    `    <MapAnnotation ID="Annotation:0" Namespace="${STIPPLE_MAP_NAMESPACE}">`,
    '      <Description>Dataset description fields without an OME element (key: field path, value: JSON)</Description>',
    values.length ? `      <Value>\n${values.join('\n')}\n      </Value>` : '      <Value/>',
    '    </MapAnnotation>',
    '  </StructuredAnnotations>',
  ].join('\n')
}

/** The dataset's description as an OME-XML document of the 2016-06 schema. */
export function exportOmeXml(m: DatasetMetadata, subject: ExportSubject): string {
  return [
    '<?xml version="1.0" encoding="UTF-8"?>',
    '<OME xmlns="http://www.openmicroscopy.org/Schemas/OME/2016-06"',
    '     xmlns:xsi="http://www.w3.org/2001/XMLSchema-instance"',
    '     xsi:schemaLocation="http://www.openmicroscopy.org/Schemas/OME/2016-06 http://www.openmicroscopy.org/Schemas/OME/2016-06/ome.xsd"',
    '     Creator="Stipple">',
    instrumentXml(m),
    imageXml(m, subject),
    annotationXml(m),
    '</OME>',
    '',
  ].join('\n')
}
