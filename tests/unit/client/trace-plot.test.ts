import { describe, expect, it } from 'vitest'
import { mount } from '@vue/test-utils'
import FrameTracePlot from '@/components/files/FrameTracePlot.vue'
import { decimate, linearScale, linePath, niceNumber, niceTicks } from '@/utils/tracePlot'

describe('scales and ticks of the trace plot', () => {
  it('maps a domain onto a range linearly, also upside down as the y axis needs', () => {
    const y = linearScale([0, 200], [176, 12])
    expect(y(0)).toBe(176)
    expect(y(200)).toBe(12)
    expect(y(50)).toBe(135)
    expect(linearScale([5, 5], [0, 10])(5)).toBe(5)
  })

  it('rounds to 1, 2, 5 × 10ⁿ as Heckbert’s nice numbers do', () => {
    // Worked by hand from the algorithm in Heckbert, "Nice numbers for graph labels" (1990).
    expect(niceNumber(438, false)).toBe(500)
    expect(niceNumber(125, true)).toBe(100)
    expect(niceNumber(0.25, true)).toBeCloseTo(0.2, 12)
    expect(niceNumber(3.3, true)).toBe(5)
    expect(niceNumber(7.5, true)).toBe(10)
  })

  it('labels loosely: ticks at whole steps enclosing the data', () => {
    // Heckbert's loose labeling of 105–543 with 5 ticks: range 500, step 100, 100 to 600.
    expect(niceTicks(105, 543, 5)).toEqual({
      domain: [100, 600],
      values: [100, 200, 300, 400, 500, 600],
      decimals: 0,
    })
    expect(niceTicks(0, 1, 5).values).toEqual([0, 0.2, 0.4, 0.6, 0.8, 1])
    expect(niceTicks(0, 1, 5).decimals).toBe(1)
    expect(niceTicks(99.3, 101.7, 5).values).toEqual([99, 100, 101, 102])
    // A flat trace still gets an axis around its value.
    expect(niceTicks(100, 100, 5).domain[0]).toBeLessThan(100)
  })

  it('keeps every spike and dip when a long trace is thinned to the chart’s width', () => {
    // Simulated bleaching trace with known extremes: a spike at frame 12 345, a dip at 777.
    const values = Array.from({ length: 20_000 }, (_, i) => 1000 * Math.exp(-i / 8000) + (i % 7))
    values[12_345] = 5000
    values[777] = 1
    const points = decimate(values, 500)
    expect(points.length).toBeLessThanOrEqual(1000)
    expect(points).toContainEqual({ frame: 12_345, value: 5000 })
    expect(points).toContainEqual({ frame: 777, value: 1 })
    expect(points.every((p, i) => i === 0 || p.frame > points[i - 1]!.frame)).toBe(true)
    expect(decimate([3, 1, 2], 500)).toEqual([
      { frame: 0, value: 3 },
      { frame: 1, value: 1 },
      { frame: 2, value: 2 },
    ])
  })

  it('draws the line through the scaled points', () => {
    const x = linearScale([0, 2], [64, 624])
    const y = linearScale([10, 20], [176, 12])
    expect(linePath(decimate([10, 20, 15], 10), x, y)).toBe('M64.0,176.0 L344.0,12.0 L624.0,94.0')
  })
})

describe('the trace plot', () => {
  it('labels its axes and spans the plot area with the data', () => {
    const wrapper = mount(FrameTracePlot, { props: { values: [10, 20, 15] } })
    const text = wrapper.text()
    expect(text).toContain('frame')
    expect(text).toContain('mean intensity (counts)')
    // y ticks for 10–20 are 10, 12 … 20 (step 2), x ticks for frames 0–2 step 0.5.
    expect(wrapper.findAll('.axis text').map((t) => t.text())).toEqual(
      expect.arrayContaining(['0', '0.5', '2', '10', '12', '20']),
    )
    expect(wrapper.find('[data-testid="trace-line"]').attributes('d')).toBe(
      'M64.0,176.0 L344.0,12.0 L624.0,94.0',
    )
    expect(wrapper.find('svg').attributes('aria-label')).toBe(
      'Mean intensity per frame over 3 frames, from 10 to 20 counts.',
    )
  })
})
