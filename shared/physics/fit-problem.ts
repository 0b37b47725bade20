/**
 * A fit request checked and laid out for the optimizer: points grouped by temperature and sorted by ΔG°,
 * weights, free parameters and their box (the coupling as log10 V); the model evaluated at a parameter vector.
 */
import { IssueCollector } from './errors'
import { checkBound, checkHuangRhys, MAX_HUANG_RHYS, MODEL_BOUNDS } from './bounds'
import { createClassicalEvaluator, createSemiclassicalEvaluator } from './rates'
import { countOf } from '../vocabulary'
import type { LsqProblem } from './fit-lm'
import {
  DEFAULT_INITIAL,
  LOG10_RATE_RANGE,
  MAX_FIT_POINTS,
  MODEL_PARAMETERS,
  type FitRequest,
  type ModelName,
  type ParameterName
} from './fit-types'

/** Points grouped by temperature, each group sorted by ΔG° (the vibronic sum is fastest on sorted input). */
export interface Group {
  T: number
  idx: Int32Array
  x: Float64Array
  out: Float64Array
}

export interface Problem {
  model: ModelName
  n: number
  y: Float64Array
  /** 1/σ per point (all 1 without uncertainties). */
  w: Float64Array
  hasSigma: boolean
  groups: Group[]
  free: ParameterName[]
  fixed: Partial<Record<ParameterName, number>>
  lo: Float64Array
  hi: Float64Array
}

export function prepare (req: FitRequest): { prob: Problem, Tmin: number, Tmax: number } {
  const c = new IssueCollector()
  if (req.model !== 'classical' && req.model !== 'semiclassical')
    c.add('/model', 'Model must be "classical" or "semiclassical"')
  if (req.temperatureK !== undefined) checkBound(c, req.temperatureK, 'temperatureK', '/temperatureK')
  if (!Array.isArray(req.points)) c.add('/points', 'Points must be an array')
  c.throwIfAny()
  const names = MODEL_PARAMETERS[req.model] as readonly ParameterName[]
  const fixed = { ...(req.fixed ?? {}) }
  for (const [key, where] of [
    ['fixed', fixed],
    ['initial', req.initial ?? {}]
  ] as const) {
    for (const [k, v] of Object.entries(where)) {
      if (!names.includes(k as ParameterName))
        c.add(`/${key}/${k}`, `Unknown parameter for the ${req.model} model; expected one of ${names.join(', ')}`)
      else checkBound(c, v, k as ParameterName, `/${key}/${k}`)
    }
  }
  if (
    req.model === 'semiclassical'
    && fixed.lambdaInternal !== undefined
    && fixed.vibrationEnergy !== undefined
    && !c.issues.length
  )
    checkHuangRhys(c, fixed.lambdaInternal, fixed.vibrationEnergy, '/fixed/lambdaInternal')
  const n = req.points.length
  if (n > MAX_FIT_POINTS) c.add('/points', `Too many points: ${n} (at most ${MAX_FIT_POINTS})`)
  c.throwIfAny()
  const x = new Float64Array(n)
  const y = new Float64Array(n)
  const s = new Float64Array(n)
  const T = new Float64Array(n)
  let withSigma = 0
  req.points.forEach((p, i) => {
    const at = `/points/${i}`
    if (c.issues.length >= 50) return
    if (typeof p !== 'object' || p === null) {
      c.add(at, 'Each point must be an object')
      return
    }
    if (checkBound(c, p.deltaG, 'drivingForce', `${at}/deltaG`)) x[i] = p.deltaG
    const t = p.temperatureK ?? req.temperatureK
    if (t === undefined)
      c.add(`${at}/temperatureK`, 'Give a temperature for this point or a temperatureK for the whole fit')
    else if (checkBound(c, t, 'temperatureK', p.temperatureK === undefined ? '/temperatureK' : `${at}/temperatureK`))
      T[i] = t
    if (p.log10Rate !== undefined) {
      if (c.finite(p.log10Rate, `${at}/log10Rate`, 'log10 rate')) {
        if (p.log10Rate < LOG10_RATE_RANGE[0] || p.log10Rate > LOG10_RATE_RANGE[1])
          c.add(`${at}/log10Rate`, `log10 rate must be between ${LOG10_RATE_RANGE[0]} and ${LOG10_RATE_RANGE[1]}`)
        else y[i] = p.log10Rate
      }
      if (
        p.log10RateUncertainty !== undefined
        && c.positive(p.log10RateUncertainty, `${at}/log10RateUncertainty`, 'Uncertainty of log10 rate')
      ) {
        if (p.log10RateUncertainty > 10)
          c.add(`${at}/log10RateUncertainty`, 'Uncertainty of log10 rate must be at most 10 (ten decades)')
        else {
          s[i] = p.log10RateUncertainty
          withSigma++
        }
      }
    }
    else if (p.rate !== undefined) {
      if (c.positive(p.rate, `${at}/rate`, 'Rate')) {
        const l = Math.log10(p.rate)
        if (l < LOG10_RATE_RANGE[0] || l > LOG10_RATE_RANGE[1])
          c.add(`${at}/rate`, `Rate must be between 1e${LOG10_RATE_RANGE[0]} and 1e${LOG10_RATE_RANGE[1]}`)
        else y[i] = l
      }
      if (
        p.rateUncertainty !== undefined
        && c.positive(p.rateUncertainty, `${at}/rateUncertainty`, 'Rate uncertainty')
      ) {
        // first-order propagation: σ(log10 k) = σ_k / (k ln 10)
        s[i] = p.rateUncertainty / (p.rate * Math.LN10)
        withSigma++
        if (!(s[i]! <= 10)) {
          c.add(`${at}/rateUncertainty`, 'Rate uncertainty is more than ten decades in log10')
          withSigma--
        }
      }
    }
    else {
      c.add(at, 'Each point needs log10Rate or rate')
    }
  })
  c.throwIfAny()
  if (withSigma > 0 && withSigma < n)
    c.add('/points', 'Give an uncertainty for every point or for none, so that the weights mean one thing')
  const free = names.filter(k => fixed[k] === undefined)
  if (free.length === 0) c.add('/fixed', 'Every parameter is fixed: there is nothing to fit')
  else if (n < free.length)
    c.add(
      '/points',
      `Under-determined fit: ${countOf(n, 'point')} for ${countOf(free.length, 'free parameter')}; fix parameters or add points`
    )
  c.throwIfAny()

  const lo = new Float64Array(free.length)
  const hi = new Float64Array(free.length)
  free.forEach((k, i) => {
    const b = MODEL_BOUNDS[k]
    lo[i] = k === 'coupling' ? Math.log10(b.min) : b.min
    hi[i] = k === 'coupling' ? Math.log10(b.max) : b.max
  })
  // S = λ_i/ħω ≤ 200 everywhere in the box: ħω ≥ λ_i,max/200 and λ_i ≤ 200 ħω_min.
  if (req.model === 'semiclassical') {
    const li = free.indexOf('lambdaInternal')
    const hw = free.indexOf('vibrationEnergy')
    const liMax = li >= 0 ? hi[li]! : fixed.lambdaInternal!
    if (hw >= 0) lo[hw] = Math.max(lo[hw]!, liMax / MAX_HUANG_RHYS)
    if (li >= 0 && hw < 0) hi[li] = Math.min(hi[li]!, MAX_HUANG_RHYS * fixed.vibrationEnergy!)
  }

  const byT = new Map<number, number[]>()
  for (let i = 0; i < n; i++) {
    const l = byT.get(T[i]!)
    if (l) l.push(i)
    else byT.set(T[i]!, [i])
  }
  const groups: Group[] = [...byT].map(([t, list]) => {
    list.sort((a, b) => x[a]! - x[b]!)
    return {
      T: t,
      idx: Int32Array.from(list),
      x: Float64Array.from(list, i => x[i]!),
      out: new Float64Array(list.length)
    }
  })
  const w = new Float64Array(n)
  for (let i = 0; i < n; i++) w[i] = withSigma === n ? 1 / s[i]! : 1
  let Tmin = Infinity
  let Tmax = -Infinity
  for (const g of groups) {
    Tmin = Math.min(Tmin, g.T)
    Tmax = Math.max(Tmax, g.T)
  }
  return { prob: { model: req.model, n, y, w, hasSigma: withSigma === n, groups, free, fixed, lo, hi }, Tmin, Tmax }
}

/** Full parameter object from the free vector (coupling as log10 V inside the vector). */
export function assemble (prob: Problem, vec: ArrayLike<number>): Record<ParameterName, number> {
  const p = { ...DEFAULT_INITIAL, ...prob.fixed } as Record<ParameterName, number>
  prob.free.forEach((k, i) => {
    p[k] = k === 'coupling' ? 10 ** vec[i]! : vec[i]!
  })
  return p
}

/** log10 k at every point for the parameter vector, written into `f` (point order). */
export function model (prob: Problem, vec: ArrayLike<number>, f: Float64Array): void {
  const p = assemble(prob, vec)
  for (const g of prob.groups) {
    if (prob.model === 'classical') {
      const ev = createClassicalEvaluator({ lambdaTotal: p.lambdaTotal, coupling: p.coupling, temperatureK: g.T })
      for (let j = 0; j < g.x.length; j++) f[g.idx[j]!] = ev.log10Rate(g.x[j]!)
    }
    else {
      const ev = createSemiclassicalEvaluator({
        lambdaSolvent: p.lambdaSolvent,
        lambdaInternal: p.lambdaInternal,
        vibrationEnergy: p.vibrationEnergy,
        coupling: p.coupling,
        temperatureK: g.T
      })
      ev.run(g.x, g.out)
      for (let j = 0; j < g.x.length; j++) f[g.idx[j]!] = g.out[j]!
    }
  }
}

/** The problem as the optimizer takes it (the coupling is already on a log scale: its step floor is 1). */
export function asLsq (prob: Problem): LsqProblem {
  return {
    n: prob.n,
    y: prob.y,
    w: prob.w,
    lo: prob.lo,
    hi: prob.hi,
    evaluate: (vec, f) => model(prob, vec, f),
    stepFloor: j => (prob.free[j] === 'coupling' ? 1 : 0.05)
  }
}

export function chiSquared (prob: Problem, f: Float64Array): number {
  let chi = 0
  for (let i = 0; i < prob.n; i++) {
    const r = (prob.y[i]! - f[i]!) * prob.w[i]!
    chi += r * r
  }
  return chi
}

/** Optimal log10 V for the other parameters (χ² is quadratic in it), clamped to its bounds; mutates vec. */
export function profileCoupling (prob: Problem, vec: number[], f: Float64Array): void {
  const ci = prob.free.indexOf('coupling')
  if (ci < 0) return
  let num = 0
  let den = 0
  for (let i = 0; i < prob.n; i++) {
    const w2 = prob.w[i]! ** 2
    num += w2 * (prob.y[i]! - f[i]!)
    den += w2
  }
  // log10 k = g + 2 log10 V, so the shift of log10 V is half the weighted mean residual
  const v = vec[ci]! + num / den / 2
  vec[ci] = Math.min(Math.max(v, prob.lo[ci]!), prob.hi[ci]!)
}
