import { execFileSync } from 'node:child_process'
import { mkdtempSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { describe, expect, it } from 'vitest'
import {
  regionsFromGeoJson,
  regionsFromOmeXml,
  regionsToGeoJson,
  regionsToOmeXml,
  type ExchangeRegion,
} from '@server/modules/region-exchange'
import { omeStandardFile, readOmeStandard } from '../../../fixtures/ome-standard'

/** Validates against the OME 2016-06 XSD kept in the repository, with xmllint (libxml2-utils). */
function validate(xml: string): void {
  const file = join(mkdtempSync(join(tmpdir(), 'roi-')), 'regions.ome.xml')
  writeFileSync(file, xml)
  try {
    execFileSync('xmllint', ['--noout', '--nonet', '--schema', omeStandardFile('ome.xsd'), file], {
      stdio: ['ignore', 'pipe', 'pipe'],
    })
  } catch (err) {
    throw new Error(
      `xmllint rejected the export:\n${String((err as { stderr?: Buffer }).stderr ?? err)}`,
    )
  }
}

const regions: ExchangeRegion[] = [
  {
    label: 'Synapse <A> & "B"',
    colour: '#ff8800',
    geometry: {
      type: 'Polygon',
      coordinates: [
        [
          [100, 200],
          [900, 200],
          [900, 700],
          [100, 700],
          [100, 200],
        ],
      ],
    },
  },
  {
    label: 'Pore outline',
    geometry: {
      type: 'Polygon',
      coordinates: [
        [
          [0, 0],
          [500, 100],
          [300, 600],
          [0, 0],
        ],
      ],
    },
  },
  {
    label: 'Ring',
    colour: '#00aaff',
    geometry: { type: 'Ellipse', center: [5000, 4000], radii: [300, 120], rotation: 30 },
  },
  { label: 'Spot', geometry: { type: 'Point', coordinates: [1234.5, 987.25] } },
  {
    label: 'Across',
    geometry: {
      type: 'LineString',
      coordinates: [
        [0, 0],
        [600, 800],
      ],
      width: 150,
    },
  },
  {
    label: 'Along',
    geometry: {
      type: 'LineString',
      coordinates: [
        [0, 0],
        [100, 0],
        [100, 100],
      ],
      width: 40,
    },
  },
]

const frame = { name: 'cell-03.csv', widthNm: 20_000, heightNm: 18_000 }

describe('OME-XML ROIs', () => {
  it('the export of every shape is valid against the OME 2016-06 XSD (xmllint)', () => {
    const xml = regionsToOmeXml(regions, frame)
    expect(() => validate(xml)).not.toThrow()
    expect(xml).toContain('<Rectangle ID="Shape:1"')
    expect(xml).toContain('PhysicalSizeX="1" PhysicalSizeXUnit="nm"')
    expect(xml).toContain('Synapse &lt;A&gt; &amp; &quot;B&quot;')
  })

  it('an export with no regions is still a valid document', () => {
    expect(() => validate(regionsToOmeXml([], frame))).not.toThrow()
  })

  it('reads its own export back to the same regions', () => {
    const back = regionsFromOmeXml(regionsToOmeXml(regions, frame))
    expect(back.skipped).toEqual([])
    expect(back.regions.map((r) => r.label)).toEqual(regions.map((r) => r.label))
    expect(back.regions[0]!.colour).toBe('#ff8800')
    back.regions.forEach((r, i) => {
      const g = r.geometry
      const want = regions[i]!.geometry
      if (g.type === 'Ellipse' && want.type === 'Ellipse') {
        expect(g.center[0]).toBeCloseTo(want.center[0], 6)
        expect(g.center[1]).toBeCloseTo(want.center[1], 6)
        expect(g.radii).toEqual(want.radii)
        expect(g.rotation).toBeCloseTo(want.rotation, 9)
      } else expect(g).toEqual(want)
    })
  })

  it('reads the specification’s ROI sample: scales by the image’s pixel size, says what it left out', () => {
    const r = regionsFromOmeXml(readOmeStandard('ROI.ome.xml'))
    // PhysicalSizeX 10000 µm (the sample's value): its Point at pixel (1, 1) is 10⁷ nm away.
    expect(r.regions.find((g) => g.geometry.type === 'Point')?.geometry).toEqual({
      type: 'Point',
      coordinates: [1e7, 1e7],
    })
    expect(r.skipped).toContainEqual({
      item: 'ROI:5 Mask Shape:7',
      reason: 'Mask shapes are not regions here',
    })
    expect(r.skipped.find((s) => s.item.startsWith('ROI:2 Line'))?.reason).toMatch(/stroke width/)
  })

  it('refuses a document type declaration', () => {
    expect(() => regionsFromOmeXml('<!DOCTYPE x [<!ENTITY a "b">]><OME/>')).toThrow(/document type/)
  })
})

describe('GeoJSON', () => {
  it('states nm and the frame, and comes back exact (the ellipse included)', () => {
    const doc = regionsToGeoJson(regions)
    expect(doc.properties.units).toBe('nm')
    expect(doc.properties.convention).toMatch(/x to the right, y downwards/)
    for (const f of doc.features) expect(f.properties.units).toBe('nm')
    expect(doc.features[2]!.geometry.type).toBe('Polygon')
    const back = regionsFromGeoJson(JSON.parse(JSON.stringify(doc)))
    expect(back.skipped).toEqual([])
    expect(back.regions).toEqual(regions)
  })

  it('leaves out what is no region here, with the reason', () => {
    const r = regionsFromGeoJson({
      type: 'FeatureCollection',
      features: [
        {
          type: 'Feature',
          geometry: {
            type: 'LineString',
            coordinates: [
              [0, 0],
              [1, 1],
            ],
          },
          properties: {},
        },
        {
          type: 'Feature',
          geometry: {
            type: 'Polygon',
            coordinates: [
              [
                [0, 0],
                [10, 0],
                [10, 10],
                [0, 0],
              ],
              [
                [1, 1],
                [2, 1],
                [2, 2],
                [1, 1],
              ],
            ],
          },
          properties: null,
        },
        {
          type: 'Feature',
          geometry: { type: 'MultiPoint', coordinates: [[0, 0]] },
          properties: {},
        },
        {
          type: 'Feature',
          geometry: { type: 'Point', coordinates: [5, 6] },
          properties: { name: 'kept' },
        },
      ],
    })
    expect(r.regions).toEqual([{ label: 'kept', geometry: { type: 'Point', coordinates: [5, 6] } }])
    expect(r.skipped.map((s) => s.reason)).toEqual([
      expect.stringMatching(/band width/),
      expect.stringMatching(/holes/),
      expect.stringMatching(/MultiPoint/),
    ])
    expect(() => regionsFromGeoJson({ type: 'Topology' })).toThrow(/FeatureCollection/)
  })
})
