/**
 * Random-effects consensus of several labs' measurements of one system: the DerSimonian–Laird estimator
 * (DerSimonian & Laird 1986) of the between-lab variance τ², the inverse-variance weighted mean with weights
 * 1/(σᵢ² + τ²), its standard error, Cochran's Q and Higgins' I², and for each measurement a leave-one-out z-score
 * against the consensus of the others. Written here (a few sums) because no maintained npm package does meta-analysis;
 * the tests compare every figure with statsmodels' combine_effects(method_re="dl").
 */

export interface Measurement {
  /** log10 k */
  y: number
  /** σ of log10 k (> 0) */
  sigma: number
}
export interface Consensus {
  /** random-effects mean of log10 k */
  mean: number
  stderr: number
  /** between-lab standard deviation, √τ² */
  tau: number
  tau2: number
  /** Cochran's Q and its degrees of freedom */
  q: number
  df: number
  /** Higgins' I² as a fraction in [0, 1] (0 when Q ≤ df) */
  i2: number
}

/** The DerSimonian–Laird consensus of at least one measurement (τ² = 0 and Q = 0 for one). */
export function dersimonianLaird (ms: readonly Measurement[]): Consensus {
  if (!ms.length) throw new RangeError('no measurements')
  for (const m of ms) {
    if (!Number.isFinite(m.y) || !Number.isFinite(m.sigma) || m.sigma <= 0)
      throw new RangeError('each measurement needs a finite value and σ > 0')
  }
  const w = ms.map(m => 1 / (m.sigma * m.sigma))
  const sw = w.reduce((a, b) => a + b, 0)
  const fixed = ms.reduce((a, m, i) => a + w[i]! * m.y, 0) / sw
  const q = ms.reduce((a, m, i) => a + w[i]! * (m.y - fixed) ** 2, 0)
  const df = ms.length - 1
  const c = sw - w.reduce((a, x) => a + x * x, 0) / sw
  const tau2 = df > 0 && c > 0 ? Math.max(0, (q - df) / c) : 0
  const wr = ms.map(m => 1 / (m.sigma * m.sigma + tau2))
  const swr = wr.reduce((a, b) => a + b, 0)
  const mean = ms.reduce((a, m, i) => a + wr[i]! * m.y, 0) / swr
  return { mean, stderr: Math.sqrt(1 / swr), tau: Math.sqrt(tau2), tau2, q, df, i2: q > df && q > 0 ? (q - df) / q : 0 }
}

/**
 * Leave-one-out z of each measurement: its distance from the consensus of all the others, over the spread expected
 * for a new lab's value, z = (yᵢ − μ₋ᵢ) / √(σᵢ² + τ²₋ᵢ + SE₋ᵢ²). NaN with fewer than two measurements.
 */
export function leaveOneOutZ (ms: readonly Measurement[]): number[] {
  return leaveGroupOutZ(ms, ms.map((_, i) => i))
}

/**
 * The same with the measurement's whole group left out (its lab: replicates of one lab do not vouch for each other).
 * NaN where no other group remains.
 */
export function leaveGroupOutZ (ms: readonly Measurement[], groups: readonly (number | string)[]): number[] {
  const cache = new Map<number | string, Consensus | null>()
  return ms.map((m, i) => {
    const g = groups[i]!
    if (!cache.has(g)) {
      const rest = ms.filter((_, j) => groups[j] !== g)
      cache.set(g, rest.length ? dersimonianLaird(rest) : null)
    }
    const rest = cache.get(g)
    return rest ? (m.y - rest.mean) / Math.sqrt(m.sigma * m.sigma + rest.tau2 + rest.stderr * rest.stderr) : Number.NaN
  })
}

/** |z| above this flags a measurement as discrepant. */
export const DISCREPANCY_Z = 3
