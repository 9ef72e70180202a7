import KDBush from 'kdbush'

/** A static k-d tree over the points (kdbush: flat arrays, built in one sort). */
export function pointIndex(x: ArrayLike<number>, y: ArrayLike<number>, count: number): KDBush {
  const index = new KDBush(Math.max(1, count), 64, Float64Array)
  for (let i = 0; i < count; i++) index.add(x[i]!, y[i]!)
  if (count === 0) index.add(0, 0) // kdbush needs one item; callers never query an empty set
  return index.finish()
}
