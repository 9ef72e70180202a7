import { describe, expect, it } from 'vitest'
import { regionShape, RegionShapeError } from '@server/compute/regions'
import { rectangle } from './point-sets'

describe('polygon containment (boundary counts as inside)', () => {
  const square = regionShape(rectangle(0, 0, 10, 10))

  it('takes in vertices, edge points and the interior; leaves out what is outside by any margin', () => {
    for (const [x, y] of [
      [0, 0],
      [10, 10],
      [0, 10],
      [5, 0],
      [10, 5],
      [5, 10],
      [0, 5],
      [5, 5],
    ] as const)
      expect(square.contains(x, y), `${x},${y}`).toBe(true)
    for (const [x, y] of [
      [-1e-9, 5],
      [10 + 1e-9, 5],
      [5, -1e-9],
      [5, 10.000001],
      [11, 11],
      [-3, 0],
    ] as const)
      expect(square.contains(x, y), `${x},${y}`).toBe(false)
    expect(square.area).toBe(100)
  })

  it('counts a ray through a vertex once (concave outline with vertices level with the point)', () => {
    // An L: the notch's inner corner (5, 5) and the vertices (10, 5) and (0, 0) lie on rays tested.
    const l = regionShape({
      type: 'Polygon',
      coordinates: [
        [
          [0, 0],
          [10, 0],
          [10, 5],
          [5, 5],
          [5, 10],
          [0, 10],
          [0, 0],
        ],
      ],
    })
    expect(l.area).toBe(75)
    expect(l.contains(2, 5)).toBe(true) // level with the notch's corners
    expect(l.contains(7, 5)).toBe(true) // on the notch's lower edge
    expect(l.contains(7, 5.0001)).toBe(false) // inside the notch
    expect(l.contains(-1, 5)).toBe(false)
    expect(l.contains(-1, 0)).toBe(false) // level with the bottom edge, left of it
    expect(l.contains(2, 0)).toBe(true)
    expect(l.contains(7, 7)).toBe(false)
    expect(l.contains(2, 9.5)).toBe(true)
  })

  it('agrees with a brute-force crossing count on a star-shaped outline of many vertices', () => {
    const ring: [number, number][] = []
    for (let k = 0; k < 400; k++) {
      const a = (2 * Math.PI * k) / 400
      const r = 1000 + 300 * Math.sin(7 * a)
      ring.push([r * Math.cos(a), r * Math.sin(a)])
    }
    ring.push(ring[0]!)
    const star = regionShape({ type: 'Polygon', coordinates: [ring] })
    // Reference: winding by summed angles (independent of the crossing rule).
    const winding = (px: number, py: number) => {
      let total = 0
      for (let i = 0; i + 1 < ring.length; i++) {
        const a = Math.atan2(ring[i]![1] - py, ring[i]![0] - px)
        const b = Math.atan2(ring[i + 1]![1] - py, ring[i + 1]![0] - px)
        let d = b - a
        if (d > Math.PI) d -= 2 * Math.PI
        if (d < -Math.PI) d += 2 * Math.PI
        total += d
      }
      return Math.abs(total) > Math.PI
    }
    for (let i = 0; i < 2000; i++) {
      const px = -1400 + ((i * 7919) % 2800)
      const py = -1400 + ((i * 104729) % 2800) + 0.5
      expect(star.contains(px, py)).toBe(winding(px, py))
    }
  })

  it('refuses an outline that crosses itself, and one without area', () => {
    const bowtie = {
      type: 'Polygon' as const,
      coordinates: [
        [
          [0, 0],
          [10, 10],
          [10, 0],
          [0, 10],
          [0, 0],
        ] as [number, number][],
      ],
    }
    expect(() => regionShape(bowtie)).toThrow(RegionShapeError)
    expect(() => regionShape(bowtie)).toThrow(/crosses itself/)
    const flat = {
      type: 'Polygon' as const,
      coordinates: [
        [
          [0, 0],
          [5, 0],
          [10, 0],
          [0, 0],
        ] as [number, number][],
      ],
    }
    expect(() => regionShape(flat)).toThrow(/no area/)
  })
})

describe('ellipse, point and line containment', () => {
  it('an ellipse rotated by 90° swaps its axes; its boundary points are inside', () => {
    const e = regionShape({ type: 'Ellipse', center: [100, 200], radii: [50, 20], rotation: 0 })
    expect(e.contains(150, 200)).toBe(true)
    expect(e.contains(100, 220)).toBe(true)
    expect(e.contains(100, 220.001)).toBe(false)
    expect(e.area).toBeCloseTo(Math.PI * 1000, 9)
    const turned = regionShape({
      type: 'Ellipse',
      center: [100, 200],
      radii: [50, 20],
      rotation: 90,
    })
    expect(turned.contains(100, 249.99)).toBe(true)
    expect(turned.contains(149.99, 200)).toBe(false)
    expect(turned.contains(119.99, 200)).toBe(true)
    expect(turned.bounds.yMax).toBeCloseTo(250, 9)
  })

  it('an ellipse at 45° takes in points along its long axis up to its semi-axis', () => {
    const e = regionShape({ type: 'Ellipse', center: [0, 0], radii: [100, 10], rotation: 45 })
    const along = (d: number) => [d * Math.SQRT1_2, d * Math.SQRT1_2] as const
    expect(e.contains(...along(99.9))).toBe(true)
    expect(e.contains(...along(100.1))).toBe(false)
    expect(e.contains(30, -30)).toBe(false) // on the short axis, 42 nm out
  })

  it('a point region is a disc of the asked radius', () => {
    const p = regionShape({ type: 'Point', coordinates: [0, 0] }, 30)
    expect(p.contains(30, 0)).toBe(true)
    expect(p.contains(18, 24)).toBe(true) // 3-4-5: exactly on the circle
    expect(p.contains(18, 24.001)).toBe(false)
    expect(p.area).toBeCloseTo(Math.PI * 900, 9)
  })

  it('a line region is the band within width/2 of the line, round at its ends', () => {
    const band = regionShape({
      type: 'LineString',
      coordinates: [
        [0, 0],
        [100, 0],
      ],
      width: 20,
    })
    expect(band.contains(50, 10)).toBe(true)
    expect(band.contains(50, -10)).toBe(true)
    expect(band.contains(50, 10.001)).toBe(false)
    expect(band.contains(106, 8)).toBe(true) // the round end: 10 from (100, 0)
    expect(band.contains(108, 8)).toBe(false)
    expect(band.area).toBeCloseTo(100 * 20 + Math.PI * 100, 9)
    const bent = regionShape({
      type: 'LineString',
      coordinates: [
        [0, 0],
        [100, 0],
        [100, 100],
      ],
      width: 10,
    })
    expect(bent.contains(100, 50)).toBe(true)
    expect(bent.contains(50, 50)).toBe(false)
    // Two 100 × 10 strips, two half-disc ends and a quarter disc at the join: 2000 + 25π·(1 + 1/4)… ≈
    expect(bent.area).toBeGreaterThan(2000 + 78.5)
    expect(bent.area).toBeLessThan(2000 + 78.5 + 25 * Math.PI)
  })
})
