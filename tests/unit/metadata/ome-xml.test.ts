import { execFileSync } from 'node:child_process'
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { describe, expect, it } from 'vitest'
import { metadataSchema, type DatasetMetadata } from '@shared/metadata/metadata.schema'
import { exportOmeXml } from '@server/modules/metadata/ome/ome-export'
import { importOmeXml } from '@server/modules/metadata/ome/ome-import'
import { completeMetadata } from '../../fixtures/metadata'
import { OME_STANDARD_DIR } from '../../fixtures/ome-standard'

/** The OME data model specification's own files, release 2016-06 (schema and sample documents). */
const STANDARD = OME_STANDARD_DIR
const sample = (name: string) => readFileSync(join(STANDARD, name), 'utf8')
const subject = {
  accession: 'STPL-000042',
  title: 'Nup96 <dSTORM> & "friends"',
  description: 'Rings & spokes',
}

/** Validates a document against the official XSD with xmllint (Debian package libxml2-utils). */
function validate(xml: string): string {
  const file = join(mkdtempSync(join(tmpdir(), 'ome-')), 'doc.ome.xml')
  writeFileSync(file, xml)
  try {
    return execFileSync(
      'xmllint',
      ['--noout', '--nonet', '--schema', join(STANDARD, 'ome.xsd'), file],
      { encoding: 'utf8', stdio: ['ignore', 'pipe', 'pipe'] },
    )
  } catch (err) {
    throw new Error(`xmllint rejected the export:\n${(err as { stderr?: string }).stderr ?? err}`)
  }
}

describe('importing the specification’s sample documents', () => {
  it('instrument.ome.xml: maps the instrument and says why impossible values were dropped', () => {
    const r = importOmeXml(sample('instrument.ome.xml'))
    expect(r.metadata.instrument).toMatchObject({
      microscopeType: 'Inverted',
      microscopeModel: 'Lab Mk3',
      objective: {
        nominalMagnification: 60,
        immersion: 'Air',
        correction: 'UV',
        model: '60xUV-Air',
      },
      lightSources: [
        { kind: 'Laser', laserType: 'SolidState', powerMw: 200 },
        { kind: 'Arc', powerMw: 300 },
      ],
      detector: { type: 'CCD', model: 'Standard CCD Mk2' },
    })
    // The sample pairs NA 1.2 with air (n = 1): physically impossible, so it is reported, not stored.
    expect(r.ignored).toContainEqual({
      from: 'Instrument/Objective@LensNA',
      reason: expect.stringMatching(/not possible with air immersion/),
    })
    // PhysicalSizeX="10000.0" in the default unit µm is 1 cm: not a pixel size at an SMLM sample.
    expect(r.ignored).toContainEqual({
      from: 'Image/Pixels@PhysicalSizeX',
      reason: expect.stringMatching(/not plausible/),
    })
    expect(r.ignored.map((i) => i.from)).toEqual(
      expect.arrayContaining([
        'Instrument/Microscope@Manufacturer',
        'Instrument/Filter@Model (4×)',
      ]),
    )
    expect(
      r.mapped.find((m) => m.path === 'instrument.objective.nominalMagnification'),
    ).toMatchObject({ from: 'Instrument/Objective@NominalMagnification', value: 60 })
  })

  it('instrument-units-alternate.ome.xml: converts non-default units', () => {
    const r = importOmeXml(sample('instrument-units-alternate.ome.xml'))
    const [laser, arc] = r.metadata.instrument!.lightSources!
    expect(laser).toMatchObject({ wavelengthNm: 590.5, powerMw: 200 }) // 590500 pm, 0.200 W
    expect(arc).toMatchObject({ powerMw: 300 }) // 3 dW
    expect(r.metadata.acquisition?.emissionWavelengthNm).toBe(488.6) // 488600 pm
  })

  it('minimum-specification.ome.xml and ROI.ome.xml: import what little they hold, report the rest', () => {
    expect(importOmeXml(sample('minimum-specification.ome.xml')).metadata).toEqual({
      acquisition: { frames: 2 },
    })
    const roi = importOmeXml(sample('ROI.ome.xml'))
    expect(roi.ignored.some((i) => i.from.startsWith('ROI/'))).toBe(true)
  })
})

describe('importing a hand-written SMLM document', () => {
  const xml = `<?xml version="1.0" encoding="UTF-8"?>
<OME xmlns="http://www.openmicroscopy.org/Schemas/OME/2016-06">
  <Instrument ID="Instrument:1">
    <Laser ID="LightSource:7" Wavelength="0.647" WavelengthUnit="µm" Power="1.5" PowerUnit="W" Type="SolidState" Pulse="CW"/>
    <Detector ID="Detector:1" Type="EMCCD" Model="Cooled EM camera" Offset="100" AmplificationGain="150"/>
    <Objective ID="Objective:2" NominalMagnification="60" LensNA="1.2" Immersion="Water"/>
    <Objective ID="Objective:3" NominalMagnification="100" LensNA="1.49" Immersion="Oil" Correction="PlanApo"/>
  </Instrument>
  <Image ID="Image:1">
    <InstrumentRef ID="Instrument:1"/>
    <ObjectiveSettings ID="Objective:3"/>
    <Pixels ID="Pixels:1" DimensionOrder="XYZCT" Type="uint16" SizeX="256" SizeY="256" SizeZ="1" SizeC="1" SizeT="20000"
            PhysicalSizeX="0.16" PhysicalSizeY="0.16" TimeIncrement="0.03">
      <Channel ID="Channel:1:0" AcquisitionMode="TIRF" IlluminationType="Epifluorescence" EmissionWavelength="690" Fluor="far-red dye">
        <DetectorSettings ID="Detector:1"/>
      </Channel>
      <MetadataOnly/>
      <Plane TheZ="0" TheT="0" TheC="0" ExposureTime="30" ExposureTimeUnit="ms"/>
    </Pixels>
  </Image>
</OME>`

  it('follows the image’s references and converts every unit', () => {
    const { metadata } = importOmeXml(xml)
    expect(metadata).toEqual({
      instrument: {
        objective: {
          nominalMagnification: 100,
          lensNA: 1.49,
          immersion: 'Oil',
          correction: 'PlanApo',
        },
        lightSources: [
          { kind: 'Laser', wavelengthNm: 647, powerMw: 1500, laserType: 'SolidState', pulse: 'CW' },
        ],
        detector: {
          type: 'EMCCD',
          model: 'Cooled EM camera',
          offsetAdu: 100,
          emGain: 150,
          pixelSizeNm: 160,
        },
      },
      acquisition: {
        frames: 20000,
        frameIntervalMs: 30,
        exposureTimeMs: 30,
        emissionWavelengthNm: 690,
        illumination: 'TIRF',
      },
      labelling: [{ label: 'far-red dye' }],
    })
  })
})

describe('hostile or broken XML', () => {
  it.each([
    [
      'entity expansion',
      '<?xml version="1.0"?><!DOCTYPE lolz [<!ENTITY lol "lol"><!ENTITY lol2 "&lol;&lol;&lol;">]><OME>&lol2;</OME>',
      /document type declaration/,
    ],
    [
      'an external entity',
      '<?xml version="1.0"?><!DOCTYPE x [<!ENTITY xxe SYSTEM "file:///etc/passwd">]><OME>&xxe;</OME>',
      /document type declaration/,
    ],
    ['malformed XML', '<OME><Instrument></OME>', /Not well-formed XML: .*line 1/],
    ['no OME root', '<Image/>', /no <OME> root/],
    ['a huge document', `<OME>${'<Image/>'.repeat(400_000)}</OME>`, /larger than 2 MB/],
  ])('%s is refused with a clear message', (_what, xml, message) => {
    expect(() => importOmeXml(xml)).toThrow(message)
  })
})

describe('exporting OME-XML', () => {
  it('validates against the official 2016-06 XSD, complete or nearly empty', () => {
    validate(exportOmeXml(metadataSchema.parse(completeMetadata()), subject))
    validate(exportOmeXml({}, subject))
    validate(
      exportOmeXml(
        { instrument: { lightSources: [{ kind: 'LightEmittingDiode', powerMw: 3 }] } },
        subject,
      ),
    )
  })

  it('round-trips import → export → import with nothing lost', () => {
    const start = metadataSchema.parse(completeMetadata())
    const once = importOmeXml(exportOmeXml(start, subject)).metadata
    expect(once).toEqual(start)
    const fromSample: DatasetMetadata = importOmeXml(
      sample('instrument-units-alternate.ome.xml'),
    ).metadata
    expect(importOmeXml(exportOmeXml(fromSample, subject)).metadata).toEqual(fromSample)
  })
})
