import { mkdtempSync, readFileSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'

/** A fresh temporary folder per test file; `cleanup` removes it. */
export function temporaryFolder() {
  const dir = mkdtempSync(join(tmpdir(), 'raw-stacks-'))
  return {
    file: (name: string) => join(dir, name),
    cleanup: () => rmSync(dir, { recursive: true, force: true }),
  }
}

/**
 * Frame t, pixel i holds step·t + i. Ground truth by arithmetic series: the mean of frame t is
 * step·t + (n − 1)/2, pixel i peaks at step·(T − 1) + i and averages step·(T − 1)/2 + i.
 */
export function ramp(width: number, height: number, step: number) {
  const n = width * height
  return {
    pixels: (frame: number) => Array.from({ length: n }, (_, i) => step * frame + i),
    frameMean: (frame: number) => step * frame + (n - 1) / 2,
    max: (frames: number) => Array.from({ length: n }, (_, i) => step * (frames - 1) + i),
    mean: (frames: number) => Array.from({ length: n }, (_, i) => (step * (frames - 1)) / 2 + i),
  }
}

/**
 * The smallest valid document of the OME 2016-06 specification's samples (BSD 2-clause licence
 * of the specification), copied verbatim beside this file.
 */
export const MINIMUM_OME_XML = readFileSync(
  new URL('./minimum-specification.ome.xml', import.meta.url),
  'utf8',
)

/** The fixture writer's entries, sorted by tag as TIFF requires (no description, no predictor). */
const FIXTURE_TAGS = [254, 256, 257, 258, 259, 262, 273, 277, 278, 279, 284, 339]

/** File position of a tag's value field in a classic little-endian fixture IFD (2 + 12·k + 8). */
export function classicValueField(ifdOffset: number, tag: number): number {
  const k = FIXTURE_TAGS.indexOf(tag)
  if (k < 0) throw new Error(`the fixture writes no tag ${tag}`)
  return ifdOffset + 2 + 12 * k + 8
}
