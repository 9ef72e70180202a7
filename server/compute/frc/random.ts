/**
 * Seeded uniform random numbers in [0, 1) (mulberry32, a 32-bit counter hashed with multiply-xorshift
 * steps; common practice for small reproducible shuffles, not for cryptography).
 */
export function seededRandom(seed: number): () => number {
  let state = seed >>> 0
  return () => {
    state = (state + 0x6d2b79f5) >>> 0
    let t = Math.imul(state ^ (state >>> 15), state | 1)
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61)
    return ((t ^ (t >>> 14)) >>> 0) / 2 ** 32
  }
}

/**
 * Half (0 = A, 1 = B) of each of `blocks` time blocks: a random permutation deals exactly half the
 * blocks to each side (one more to A when the count is odd), so both halves span the whole run.
 */
export function assignBlocksToHalves(blocks: number, random: () => number): Uint8Array {
  const order = Array.from({ length: blocks }, (_, i) => i)
  for (let i = blocks - 1; i > 0; i--) {
    const j = Math.floor(random() * (i + 1))
    const kept = order[i]!
    order[i] = order[j]!
    order[j] = kept
  }
  const half = new Uint8Array(blocks)
  for (let rank = Math.ceil(blocks / 2); rank < blocks; rank++) half[order[rank]!] = 1
  return half
}
