/**
 * Decay traces: mono- and bi-exponential decays with a constant offset, as measured (no instrument response),
 * convolved with a Gaussian instrument response (closed form with erfc / erfcx), or with a measured response
 * (each of its samples a box of its spacing's width holding its share of the area: a histogram, convolved
 * exactly). Times in the trace's own unit throughout. The checks of a fit request are in decay-check.ts.
 */
import erfcx from '@stdlib/math-base-special-erfcx'
import erfc from '@stdlib/math-base-special-erfc'

/** FWHM = 2 √(2 ln 2) σ for a Gaussian. */
export const FWHM_PER_SIGMA = 2 * Math.sqrt(2 * Math.LN2)
export type DecayModelName = 'mono' | 'bi'
export type IrfKind = 'none' | 'gaussian' | 'measured'
export type Weighting = 'poisson' | 'given' | 'none'
export type DecayParam = 'a1' | 'tau1' | 'a2' | 'tau2' | 'offset' | 't0' | 'irfFwhm'
/** Seconds per unit of the time axis. */
export const TIME_UNITS = { fs: 1e-15, ps: 1e-12, ns: 1e-9, us: 1e-6, ms: 1e-3, s: 1 } as const
export type TimeUnit = keyof typeof TIME_UNITS

export const PARAMETER_WORDS: Record<DecayParam, string> = {
  a1: 'amplitude 1',
  tau1: 'lifetime τ₁',
  a2: 'amplitude 2',
  tau2: 'lifetime τ₂',
  offset: 'offset',
  t0: 'time zero',
  irfFwhm: 'response width (FWHM)'
}

/**
 * exp(−u/τ) for u ≥ 0 (0 before) convolved with a unit-area Gaussian of standard deviation σ:
 * ½ exp(σ²/2τ² − u/τ) erfc(b), b = (σ²/τ − u)/(σ√2). Where b ≥ 0 the product of a large exponential and a
 * small erfc is written as ½ exp(−u²/2σ²) erfcx(b), which neither overflows nor loses digits.
 */
export function gaussianExp (u: number, tau: number, sigma: number): number {
  const k = 1 / tau
  const b = (k * sigma * sigma - u) / (sigma * Math.SQRT2)
  if (b >= 0) return 0.5 * Math.exp((-u * u) / (2 * sigma * sigma)) * erfcx(b)
  return 0.5 * Math.exp((k * k * sigma * sigma) / 2 - k * u) * erfc(b)
}

/** exp(−u/τ) (0 before u = 0) averaged over a box [c − h/2, c + h/2] of time zeros. */
export function boxExp (u: number, tau: number, c: number, h: number): number {
  const lo = u - (c + h / 2)
  if (lo >= 0) return (tau / h) * Math.exp(-lo / tau) * (1 - Math.exp(-h / tau))
  const hi = u - (c - h / 2)
  if (hi <= 0) return 0
  return (tau / h) * (1 - Math.exp(-hi / tau))
}

/** A measured response made ready: its boxes (start, end, width) ordered by end, and their area shares (sum 1). */
export interface IrfHistogram {
  b: Float64Array
  e: Float64Array
  h: Float64Array
  w: Float64Array
  maxH: number
}
export function irfHistogram (times: ArrayLike<number>, signal: ArrayLike<number>): IrfHistogram {
  const m = times.length
  const rows: { c: number, h: number, a: number }[] = []
  let total = 0
  for (let j = 0; j < m; j++) {
    const h = j === 0 ? times[1]! - times[0]! : j === m - 1 ? times[m - 1]! - times[m - 2]! : (times[j + 1]! - times[j - 1]!) / 2
    const a = Math.max(0, signal[j]!) * h
    total += a
    // samples that hold no area cost time and add nothing
    if (a > 0) rows.push({ c: times[j]!, h, a })
  }
  rows.sort((x, y) => x.c + x.h / 2 - (y.c + y.h / 2))
  return {
    b: Float64Array.from(rows, r => r.c - r.h / 2),
    e: Float64Array.from(rows, r => r.c + r.h / 2),
    h: Float64Array.from(rows, r => r.h),
    w: Float64Array.from(rows, r => r.a / total),
    maxH: Math.max(...rows.map(r => r.h))
  }
}

/**
 * exp(−u/τ) convolved with the histogram at increasing u, in one pass (O(points + samples) rather than their
 * product): boxes that ended before u add up in a running sum that decays by exp(−Δu/τ) from point to point;
 * the few boxes u lies inside are integrated directly (boxExp). Adds a × the result into out.
 */
function addMeasured (u: Float64Array, tau: number, a: number, H: IrfHistogram, out: Float64Array): void {
  const m = H.w.length
  const full = new Float64Array(m)
  for (let j = 0; j < m; j++) full[j] = H.w[j]! * (tau / H.h[j]!) * -Math.expm1(-H.h[j]! / tau)
  let sum = 0
  let p = 0
  let last = -Infinity
  for (let i = 0; i < u.length; i++) {
    const ui = u[i]!
    if (sum) sum *= Math.exp(-(ui - last) / tau)
    last = ui
    while (p < m && H.e[p]! <= ui) {
      sum += full[p]! * Math.exp(-(ui - H.e[p]!) / tau)
      p++
    }
    let inside = 0
    for (let j = p; j < m && H.e[j]! < ui + H.maxH; j++) {
      if (H.b[j]! < ui) inside += H.w[j]! * (tau / H.h[j]!) * -Math.expm1(-(ui - H.b[j]!) / tau)
    }
    out[i] = out[i]! + a * (sum + inside)
  }
}

/** The parameters of a model, in vector order. */
export function parameterNames (model: DecayModelName, irf: IrfKind): DecayParam[] {
  return [
    'a1', 'tau1', ...(model === 'bi' ? (['a2', 'tau2'] as const) : []), 'offset', 't0',
    ...(irf === 'gaussian' ? (['irfFwhm'] as const) : [])
  ]
}

/** The decay curve at `times` for full parameters `p`, written into `out`. */
export function decayCurve (
  model: DecayModelName,
  irf: IrfKind,
  p: Record<DecayParam, number>,
  times: ArrayLike<number>,
  out: Float64Array,
  histogram?: IrfHistogram
): void {
  const comps: [number, number][] = model === 'bi' ? [[p.a1, p.tau1], [p.a2, p.tau2]] : [[p.a1, p.tau1]]
  const n = times.length
  if (irf === 'measured') {
    const u = new Float64Array(n)
    for (let i = 0; i < n; i++) {
      u[i] = times[i]! - p.t0
      out[i] = p.offset
    }
    for (const [a, tau] of comps) addMeasured(u, tau, a, histogram!, out)
    return
  }
  const sigma = p.irfFwhm / FWHM_PER_SIGMA
  for (let i = 0; i < n; i++) {
    const u = times[i]! - p.t0
    let y = p.offset
    for (const [a, tau] of comps) {
      if (irf === 'gaussian') y += a * gaussianExp(u, tau, sigma)
      else if (u >= 0) y += a * Math.exp(-u / tau)
    }
    out[i] = y
  }
}
