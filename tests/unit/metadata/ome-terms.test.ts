import { describe, expect, it } from 'vitest'
import * as terms from '@shared/metadata/ome-terms'
import { readOmeStandard } from '../../fixtures/ome-standard'

/** The official OME 2016-06 XSD, kept in the repository's neighbour folder of published standards. */
const xsd = readOmeStandard('ome.xsd')

function enumerationOf(element: string, attribute: string): string[] {
  const start = xsd.indexOf(`<xsd:element name="${element}"`)
  const block = xsd.slice(start)
  const at = block.indexOf(`<xsd:attribute name="${attribute}"`)
  const end = block.indexOf('</xsd:attribute>', at)
  return [...block.slice(at, end).matchAll(/<xsd:enumeration value="([^"]+)"/g)].map((m) => m[1]!)
}

describe('OME terms', () => {
  it.each([
    ['Microscope', 'Type', terms.OME_MICROSCOPE_TYPES],
    ['Objective', 'Immersion', terms.OME_IMMERSIONS],
    ['Objective', 'Correction', terms.OME_CORRECTIONS],
    ['Laser', 'Type', terms.OME_LASER_TYPES],
    ['Laser', 'Pulse', terms.OME_LASER_PULSES],
    ['Detector', 'Type', terms.OME_DETECTOR_TYPES],
    ['Channel', 'IlluminationType', terms.OME_ILLUMINATION_TYPES],
    ['Channel', 'AcquisitionMode', terms.OME_ACQUISITION_MODES],
  ] as const)('%s@%s matches the 2016-06 schema exactly', (element, attribute, ours) => {
    expect([...ours]).toEqual(enumerationOf(element, attribute))
  })
})
