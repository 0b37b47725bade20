/** Small numeric helpers of the record index: bit-set Tanimoto, trigram Jaccard, partial top-k. */
/** Tanimoto coefficient |A∩B| / |A∪B| of two bit sets packed in 32-bit words (1 when both are empty). */
export function tanimoto (a: Uint32Array, b: Uint32Array): number {
  let and = 0
  let or = 0
  for (let i = 0; i < a.length; i++) {
    and += popcount(a[i]! & b[i]!)
    or += popcount(a[i]! | b[i]!)
  }
  return or ? and / or : 1
}
export function popcount (x: number): number {
  x -= (x >>> 1) & 0x55555555
  x = (x & 0x33333333) + ((x >>> 2) & 0x33333333)
  return (((x + (x >>> 4)) & 0x0f0f0f0f) * 0x01010101) >>> 24
}
export function trigrams (s: string): Set<string> {
  const t = ` ${s.toLowerCase()} `
  const out = new Set<string>()
  for (let i = 0; i + 3 <= t.length; i++) out.add(t.slice(i, i + 3))
  return out
}
export function jaccard (a: Set<string>, b: Set<string>): number {
  let inter = 0
  for (const x of a) if (b.has(x)) inter++
  return inter / (a.size + b.size - inter || 1)
}

/**
 * The first k items of `xs` in `cmp` order, sorted: a bounded binary heap, O(n log k), because a
 * page of 50 out of 100 000 hits need not sort them all. Falls back to a full sort for large k.
 */
export function topK (
  xs: ArrayLike<number> & Iterable<number>,
  k: number,
  cmp: (a: number, b: number) => number
): number[] {
  if (k <= 0) return []
  if (k >= xs.length / 4) return Array.from(xs).sort(cmp).slice(0, k)
  const heap: number[] = [] // max-heap by cmp: the worst kept item on top
  const up = (i: number) => {
    while (i > 0) {
      const p = (i - 1) >> 1
      if (cmp(heap[i]!, heap[p]!) <= 0) break
      ;[heap[i], heap[p]] = [heap[p]!, heap[i]!]
      i = p
    }
  }
  const down = (i: number) => {
    for (;;) {
      const l = 2 * i + 1
      const r = l + 1
      let m = i
      if (l < heap.length && cmp(heap[l]!, heap[m]!) > 0) m = l
      if (r < heap.length && cmp(heap[r]!, heap[m]!) > 0) m = r
      if (m === i) return
      ;[heap[i], heap[m]] = [heap[m]!, heap[i]!]
      i = m
    }
  }
  for (const x of xs) {
    if (heap.length < k) {
      heap.push(x)
      up(heap.length - 1)
    }
    else if (cmp(x, heap[0]!) < 0) {
      heap[0] = x
      down(0)
    }
  }
  return heap.sort(cmp)
}
