// @vitest-environment node
import { afterAll, describe, expect, it } from 'vitest'
import { readStackHeader, resolveOmeFileSet, scanStack } from '@server/compute/raw-stacks'
import { writeTiffStack } from '../../fixtures/tiff-writer'
import { ramp, temporaryFolder } from './stack-fixtures'

const folder = temporaryFolder()
afterAll(folder.cleanup)

const NS = 'http://www.openmicroscopy.org/Schemas/OME/2016-06'
const MASTER_UUID = 'urn:uuid:7d3e8c1a-0000-4000-8000-000000000001'
const PART_UUID = 'urn:uuid:7d3e8c1a-0000-4000-8000-000000000002'

// Both documents validate against the OME 2016-06 schema (xmllint --schema, checked when written).

/** Seven time points over two files: T 0–3 in the first, T 4–6 in the second. */
const MASTER_XML = `<?xml version="1.0" encoding="UTF-8"?>
<OME xmlns="${NS}" UUID="${MASTER_UUID}">
  <Image ID="Image:0"><Pixels ID="Pixels:0" DimensionOrder="XYZCT" Type="uint16" SizeX="6" SizeY="5" SizeZ="1" SizeC="1" SizeT="7">
    <Channel ID="Channel:0:0" SamplesPerPixel="1"/>
    <TiffData IFD="0" PlaneCount="4"><UUID FileName="run_part0.ome.tif">${MASTER_UUID}</UUID></TiffData>
    <TiffData IFD="0" PlaneCount="3" FirstT="4"><UUID FileName="run_part1.ome.tif">${PART_UUID}</UUID></TiffData>
  </Pixels></Image>
</OME>`

const PART_XML = `<OME xmlns="${NS}" UUID="${PART_UUID}"><BinaryOnly MetadataFile="run_part0.ome.tif" UUID="${MASTER_UUID}"/></OME>`

describe('a two-file OME-TIFF, end to end', () => {
  it('finds both parts from the first file, checks they are complete, and scans them in order', async () => {
    const truth = ramp(6, 5, 50)
    writeTiffStack(folder.file('run_part0.ome.tif'), {
      width: 6,
      height: 5,
      frames: 4,
      pixels: truth.pixels,
      description: MASTER_XML,
    })
    writeTiffStack(folder.file('run_part1.ome.tif'), {
      width: 6,
      height: 5,
      frames: 3,
      pixels: (t) => truth.pixels(t + 4),
      description: PART_XML,
      kind: 'bigtiff',
    })

    const master = await readStackHeader(folder.file('run_part0.ome.tif'))
    const set = resolveOmeFileSet(master.omeXml!)
    expect(set.files.map((part) => [part.fileName, part.minimumIfds])).toEqual([
      ['run_part0.ome.tif', 4],
      ['run_part1.ome.tif', 3],
    ])
    for (const part of set.files) {
      expect((await readStackHeader(folder.file(part.fileName!))).frames).toBeGreaterThanOrEqual(
        part.minimumIfds!,
      )
    }
    const partHeader = await readStackHeader(folder.file('run_part1.ome.tif'))
    expect(resolveOmeFileSet(partHeader.omeXml!).binaryOnly).toEqual({
      metadataFile: 'run_part0.ome.tif',
      uuid: MASTER_UUID,
    })

    const ordered = [...set.files].sort((a, b) => a.ranges[0]!.firstPlane - b.ranges[0]!.firstPlane)
    const scan = await scanStack({ paths: ordered.map((part) => folder.file(part.fileName!)) })
    expect(Array.from(scan.meanTrace)).toEqual(
      Array.from({ length: 7 }, (_, t) => truth.frameMean(t)),
    )
    expect(Array.from(scan.maxProjection)).toEqual(truth.max(7))
  })
})
