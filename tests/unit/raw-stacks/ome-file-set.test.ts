// @vitest-environment node
import { readFileSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import { isOmeXml, resolveOmeFileSet } from '@server/compute/raw-stacks'
import { MINIMUM_OME_XML } from './stack-fixtures'

/** Hand-written beside this file; it validates against the OME 2016-06 schema (xmllint --schema). */
const TWO_FILES = readFileSync(new URL('./two-files.ome.xml', import.meta.url), 'utf8')

const tiffData = (attributes: string, uuid = '') =>
  `<OME xmlns="http://www.openmicroscopy.org/Schemas/OME/2016-06"><Image ID="Image:0">` +
  `<Pixels ID="Pixels:0" DimensionOrder="XYZCT" Type="uint16" SizeX="4" SizeY="4" SizeZ="3" SizeC="2" SizeT="7">` +
  `<TiffData ${attributes}>${uuid}</TiffData></Pixels></Image></OME>`

describe('resolveOmeFileSet', () => {
  it('lists both files of a two-file set with their IFD ranges and first planes', () => {
    const set = resolveOmeFileSet(TWO_FILES)
    expect(set.uuid).toBe('urn:uuid:0f5c3a52-8a53-4f8e-9c1d-3b7f2d6e0001')
    expect(set.binaryOnly).toBeNull()
    expect(set.files).toEqual([
      {
        fileName: 'run&1_part0.ome.tif',
        uuid: 'urn:uuid:0f5c3a52-8a53-4f8e-9c1d-3b7f2d6e0001',
        ranges: [{ imageId: 'Image:0', ifd: 0, planeCount: 6, firstPlane: 0 }],
        minimumIfds: 6,
      },
      {
        fileName: 'run&1_part1.ome.tif',
        uuid: 'urn:uuid:0f5c3a52-8a53-4f8e-9c1d-3b7f2d6e0002',
        // XYCTZ with SizeC 2: (C 0, T 3) is plane 0 + 2·3 = 6, right after the first file's six.
        ranges: [
          { imageId: 'Image:0', ifd: 0, planeCount: 4, firstPlane: 6 },
          { imageId: 'Image:1', ifd: 4, planeCount: 1, firstPlane: 0 },
        ],
        minimumIfds: 5,
      },
    ])
    expect(set.images.map((image) => [image.imageId, image.planes, image.tiffData.length])).toEqual(
      [
        ['Image:0', 10, 2],
        ['Image:1', 1, 1],
      ],
    )
  })

  // Defaults from the TiffData documentation of the OME 2016-06 schema.
  it('applies the schema defaults for IFD, PlaneCount and First*', () => {
    const [all] = resolveOmeFileSet(tiffData('')).images[0]!.tiffData
    expect(all).toEqual({
      fileName: null,
      uuid: null,
      ifd: 0,
      planeCount: null,
      firstZ: 0,
      firstT: 0,
      firstC: 0,
      firstPlane: 0,
    })
    const [one] = resolveOmeFileSet(tiffData('IFD="5" FirstZ="2" FirstC="1" FirstT="4"')).images[0]!
      .tiffData
    // XYZCT, SizeZ 3, SizeC 2: plane = z + 3·(c + 2·t) = 2 + 3·(1 + 8) = 29.
    expect(one).toMatchObject({ ifd: 5, planeCount: 1, firstPlane: 29 })
    expect(resolveOmeFileSet(tiffData('')).files[0]!.minimumIfds).toBeNull()
  })

  it('reads a UUID without a file name as a part known only by its UUID', () => {
    const set = resolveOmeFileSet(tiffData('PlaneCount="42"', '<UUID>urn:uuid:aa</UUID>'))
    expect(set.files).toEqual([
      {
        fileName: null,
        uuid: 'urn:uuid:aa',
        ranges: [expect.objectContaining({ planeCount: 42 })],
        minimumIfds: 42,
      },
    ])
  })

  it('recognises a file that points to its metadata elsewhere (BinaryOnly)', () => {
    const xml =
      '<OME xmlns="http://www.openmicroscopy.org/Schemas/OME/2016-06" UUID="urn:uuid:b2">' +
      '<BinaryOnly MetadataFile="run.companion.ome" UUID="urn:uuid:c0"/></OME>'
    expect(resolveOmeFileSet(xml)).toEqual({
      uuid: 'urn:uuid:b2',
      binaryOnly: { metadataFile: 'run.companion.ome', uuid: 'urn:uuid:c0' },
      images: [],
      files: [],
    })
  })

  it('reads the specification sample document (pixels in BinData, so no files)', () => {
    const set = resolveOmeFileSet(MINIMUM_OME_XML)
    expect(set.images).toEqual([
      expect.objectContaining({
        imageId: 'Image:1',
        dimensionOrder: 'XYZCT',
        planes: 8,
        tiffData: [],
      }),
    ])
    expect(set.files).toEqual([])
  })

  it('refuses DOCTYPE and entity declarations', () => {
    const bomb =
      '<?xml version="1.0"?><!DOCTYPE OME [<!ENTITY a "aaaaaaaa"><!ENTITY b "&a;&a;&a;">]><OME>&b;</OME>'
    expect(() => resolveOmeFileSet(bomb)).toThrow(expect.objectContaining({ code: 'unsafe-xml' }))
    const external = '<!DOCTYPE OME SYSTEM "file:///etc/passwd"><OME/>'
    expect(() => resolveOmeFileSet(external)).toThrow(
      expect.objectContaining({ code: 'unsafe-xml' }),
    )
  })

  it('refuses XML that is not well-formed, and attributes that are not whole numbers', () => {
    expect(() => resolveOmeFileSet('<OME><Image></OME>')).toThrow(/not well-formed/)
    expect(() => resolveOmeFileSet(tiffData('IFD="-1"'))).toThrow(
      'OME-XML: IFD="-1" is not a whole number',
    )
    expect(() => resolveOmeFileSet('<Other/>')).toThrow(/no OME root/)
  })
})

describe('isOmeXml', () => {
  it.each([
    [MINIMUM_OME_XML, true],
    ['<ome:OME xmlns:ome="http://www.openmicroscopy.org/Schemas/OME/2016-06"/>', true],
    ['\uFEFF<?xml version="1.0"?>\n<!-- acquisition -->\n<OME>', true],
    ['<OMEGA/>', false],
    ['<Root><OME/></Root>', false],
    ['exposure 30 ms', false],
  ])('%#: %s', (text, expected) => {
    expect(isOmeXml(text)).toBe(expected)
  })
})
