/**
 * Weighted non-linear least squares of log10 k against ΔG° for the classical or semi-classical
 * expression, with box bounds on every parameter, temperature per point and an honest status.
 *
 * Why our own optimizer: the maintained JavaScript package (ml-levenberg-marquardt 5.1) clamps
 * parameters after each step but takes its finite-difference steps outside the bounds (λ_i = −1e-7
 * at a bound of 0), stops on an iteration count or an absolute error only, and weights the step and
 * the error differently; no maintained npm package offers bounded least squares. So this is a
 * projected Levenberg–Marquardt with an active set:
 * - every evaluation stays inside the bounds: derivative steps are one-sided at a bound, trial
 *   steps are projected onto the box, and parameters held at a bound by the gradient are left out
 *   of the step (and out of the covariance, whose standard errors then come from the reduced problem);
 * - convergence is judged by the gradient (the cosine between the residual vector and each free
 *   column of the Jacobian, as MINPACK's gtol), the step and the χ² change together;
 * - several starts: the caller's, and the best points of a coarse scan of the bounded parameter
 *   box (the coupling profiled out in closed form, since log10 k is linear in log10 V); the best run
 *   wins, and a run that stalls is reported as stalled, never as converged.
 * Energies in eV; the coupling is fitted as log10 V.
 */
import { solve, Matrix } from 'ml-matrix'
import { IssueCollector } from './errors'
import { checkBound, checkHuangRhys, MAX_HUANG_RHYS, MODEL_BOUNDS } from './bounds'
import { createClassicalEvaluator, createSemiclassicalEvaluator } from './rates'

export type ModelName = 'classical' | 'semiclassical'
export const MODEL_PARAMETERS = {
  classical: ['lambdaTotal', 'coupling'],
  semiclassical: ['lambdaSolvent', 'lambdaInternal', 'vibrationEnergy', 'coupling']
} as const
export type ParameterName = 'lambdaTotal' | 'lambdaSolvent' | 'lambdaInternal' | 'vibrationEnergy' | 'coupling'

/** Defaults for starting values (eV); the coupling's start is scaled to the data instead. */
export const DEFAULT_INITIAL: Record<ParameterName, number> = {
  lambdaTotal: 0.8, lambdaSolvent: 0.6, lambdaInternal: 0.3, vibrationEnergy: 0.18, coupling: 0.001
}
export const MAX_FIT_POINTS = 20000
/** Measured log10 k (s⁻¹ or M⁻¹ s⁻¹) accepted by a fit: far wider than any measurement (common practice). */
export const LOG10_RATE_RANGE: [number, number] = [-30, 20]

export const PARAMETER_LABELS: Record<ParameterName, string> = {
  lambdaTotal: 'the reorganization energy λ',
  lambdaSolvent: 'the solvent reorganization energy λ_s',
  lambdaInternal: 'the internal reorganization energy λ_i',
  vibrationEnergy: 'the mode energy ħω',
  coupling: 'the coupling V'
}

export interface FitPoint {
  deltaG: number
  log10Rate?: number
  log10RateUncertainty?: number
  rate?: number
  rateUncertainty?: number
  /** Temperature of this measurement, K; wins over the request's temperatureK. */
  temperatureK?: number
}

export interface FitRequest {
  model: ModelName
  /** Temperature for points that do not carry their own, K. */
  temperatureK?: number
  points: FitPoint[]
  fixed?: Partial<Record<ParameterName, number>>
  initial?: Partial<Record<ParameterName, number>>
}

export interface FittedParameter {
  value: number
  /** Standard error (eV for energies); null when the data cannot constrain the parameter. */
  stderr: number | null
  /** For the coupling: standard error of log10 V. */
  log10Stderr?: number | null
  fixed: boolean
  /** Set when the fit ended with this parameter held at a bound of its allowed range. */
  atBound?: 'lower' | 'upper'
}

export type FitStatus = 'converged' | 'stalled' | 'at-bound'

export interface FitResult {
  model: ModelName
  /** The request's temperature, or the single temperature of all points; null for a temperature series. */
  temperatureK: number | null
  /** Lowest and highest temperature among the points, K. */
  temperatureRangeK: [number, number]
  parameters: Partial<Record<ParameterName, FittedParameter>>
  chiSquared: number
  /** χ² / (n − p); null when there are no degrees of freedom left. */
  chiSquaredReduced: number | null
  degreesOfFreedom: number
  /** Observed minus fitted log10 k, in the order of the points. */
  residuals: number[]
  /** 'absolute' when every point carried an uncertainty; 'scaled' by √χ²_red otherwise. */
  uncertaintyKind: 'absolute' | 'scaled'
  /** converged: a minimum with every free parameter inside its range; at-bound: the best point holds
   *  the parameters named in atBound at an edge; stalled: no minimum was confirmed. */
  status: FitStatus
  atBound: ParameterName[]
  /** false only when status is stalled. */
  converged: boolean
  iterations: number
  /** Optimizer runs made (the caller's start and the best points of a scan). */
  starts: number
  /** Bounds each free parameter was kept in (the coupling in eV). */
  bounds: Partial<Record<ParameterName, [number, number]>>
  /** Plain-language cautions: unconstrained parameters, values at bounds or outside usual ranges. */
  warnings: string[]
}

/** Points grouped by temperature, each group sorted by ΔG° (the vibronic sum is fastest on sorted input). */
interface Group { T: number, idx: Int32Array, x: Float64Array, out: Float64Array }

interface Problem {
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

function prepare (req: FitRequest): { prob: Problem, Tmin: number, Tmax: number } {
  const c = new IssueCollector()
  if (req.model !== 'classical' && req.model !== 'semiclassical') c.add('/model', 'Model must be "classical" or "semiclassical"')
  if (req.temperatureK !== undefined) checkBound(c, req.temperatureK, 'temperatureK', '/temperatureK')
  if (!Array.isArray(req.points)) c.add('/points', 'Points must be an array')
  c.throwIfAny()
  const names = MODEL_PARAMETERS[req.model] as readonly ParameterName[]
  const fixed = { ...(req.fixed ?? {}) }
  for (const [key, where] of [['fixed', fixed], ['initial', req.initial ?? {}]] as const) {
    for (const [k, v] of Object.entries(where)) {
      if (!names.includes(k as ParameterName)) c.add(`/${key}/${k}`, `Unknown parameter for the ${req.model} model; expected one of ${names.join(', ')}`)
      else checkBound(c, v, k as ParameterName, `/${key}/${k}`)
    }
  }
  if (req.model === 'semiclassical' && fixed.lambdaInternal !== undefined && fixed.vibrationEnergy !== undefined
    && !c.issues.length) checkHuangRhys(c, fixed.lambdaInternal, fixed.vibrationEnergy, '/fixed/lambdaInternal')
  const n = req.points.length
  if (n > MAX_FIT_POINTS) c.add('/points', `Too many points: ${n} (at most ${MAX_FIT_POINTS})`)
  c.throwIfAny()
  const x = new Float64Array(n); const y = new Float64Array(n); const s = new Float64Array(n); const T = new Float64Array(n)
  let withSigma = 0
  req.points.forEach((p, i) => {
    const at = `/points/${i}`
    if (c.issues.length >= 50) return
    if (typeof p !== 'object' || p === null) { c.add(at, 'Each point must be an object'); return }
    if (checkBound(c, p.deltaG, 'drivingForce', `${at}/deltaG`)) x[i] = p.deltaG
    const t = p.temperatureK ?? req.temperatureK
    if (t === undefined) c.add(`${at}/temperatureK`, 'Give a temperature for this point or a temperatureK for the whole fit')
    else if (checkBound(c, t, 'temperatureK', p.temperatureK === undefined ? '/temperatureK' : `${at}/temperatureK`)) T[i] = t
    if (p.log10Rate !== undefined) {
      if (c.finite(p.log10Rate, `${at}/log10Rate`, 'log10 rate')) {
        if (p.log10Rate < LOG10_RATE_RANGE[0] || p.log10Rate > LOG10_RATE_RANGE[1]) c.add(`${at}/log10Rate`, `log10 rate must be between ${LOG10_RATE_RANGE[0]} and ${LOG10_RATE_RANGE[1]}`)
        else y[i] = p.log10Rate
      }
      if (p.log10RateUncertainty !== undefined && c.positive(p.log10RateUncertainty, `${at}/log10RateUncertainty`, 'Uncertainty of log10 rate')) {
        if (p.log10RateUncertainty > 10) c.add(`${at}/log10RateUncertainty`, 'Uncertainty of log10 rate must be at most 10 (ten decades)')
        else { s[i] = p.log10RateUncertainty; withSigma++ }
      }
    }
    else if (p.rate !== undefined) {
      if (c.positive(p.rate, `${at}/rate`, 'Rate')) {
        const l = Math.log10(p.rate)
        if (l < LOG10_RATE_RANGE[0] || l > LOG10_RATE_RANGE[1]) c.add(`${at}/rate`, `Rate must be between 1e${LOG10_RATE_RANGE[0]} and 1e${LOG10_RATE_RANGE[1]}`)
        else y[i] = l
      }
      if (p.rateUncertainty !== undefined && c.positive(p.rateUncertainty, `${at}/rateUncertainty`, 'Rate uncertainty')) {
        // first-order propagation: σ(log10 k) = σ_k / (k ln 10)
        s[i] = p.rateUncertainty / (p.rate * Math.LN10); withSigma++
        if (!(s[i]! <= 10)) { c.add(`${at}/rateUncertainty`, 'Rate uncertainty is more than ten decades in log10'); withSigma-- }
      }
    }
    else {
      c.add(at, 'Each point needs log10Rate or rate')
    }
  })
  c.throwIfAny()
  if (withSigma > 0 && withSigma < n) c.add('/points', 'Give an uncertainty for every point or for none, so that the weights mean one thing')
  const free = names.filter(k => fixed[k] === undefined)
  if (free.length === 0) c.add('/fixed', 'Every parameter is fixed: there is nothing to fit')
  else if (n < free.length) c.add('/points', `Under-determined fit: ${n} point(s) for ${free.length} free parameter(s); fix parameters or add points`)
  c.throwIfAny()

  const lo = new Float64Array(free.length); const hi = new Float64Array(free.length)
  free.forEach((k, i) => {
    const b = MODEL_BOUNDS[k]
    lo[i] = k === 'coupling' ? Math.log10(b.min) : b.min
    hi[i] = k === 'coupling' ? Math.log10(b.max) : b.max
  })
  // S = λ_i/ħω ≤ 200 everywhere in the box: ħω ≥ λ_i,max/200 and λ_i ≤ 200 ħω_min.
  if (req.model === 'semiclassical') {
    const li = free.indexOf('lambdaInternal'); const hw = free.indexOf('vibrationEnergy')
    const liMax = li >= 0 ? hi[li]! : fixed.lambdaInternal!
    if (hw >= 0) lo[hw] = Math.max(lo[hw]!, liMax / MAX_HUANG_RHYS)
    if (li >= 0 && hw < 0) hi[li] = Math.min(hi[li]!, MAX_HUANG_RHYS * fixed.vibrationEnergy!)
  }

  const byT = new Map<number, number[]>()
  for (let i = 0; i < n; i++) { const l = byT.get(T[i]!); if (l) l.push(i); else byT.set(T[i]!, [i]) }
  const groups: Group[] = [...byT].map(([t, list]) => {
    list.sort((a, b) => x[a]! - x[b]!)
    return { T: t, idx: Int32Array.from(list), x: Float64Array.from(list, i => x[i]!), out: new Float64Array(list.length) }
  })
  const w = new Float64Array(n)
  for (let i = 0; i < n; i++) w[i] = withSigma === n ? 1 / s[i]! : 1
  let Tmin = Infinity; let Tmax = -Infinity
  for (const g of groups) { Tmin = Math.min(Tmin, g.T); Tmax = Math.max(Tmax, g.T) }
  return { prob: { model: req.model, n, y, w, hasSigma: withSigma === n, groups, free, fixed, lo, hi }, Tmin, Tmax }
}

/** Full parameter object from the free vector (coupling as log10 V inside the vector). */
function assemble (prob: Problem, vec: ArrayLike<number>): Record<ParameterName, number> {
  const p = { ...DEFAULT_INITIAL, ...prob.fixed } as Record<ParameterName, number>
  prob.free.forEach((k, i) => { p[k] = k === 'coupling' ? 10 ** vec[i]! : vec[i]! })
  return p
}

/** log10 k at every point for the parameter vector, written into `f` (point order). */
function model (prob: Problem, vec: ArrayLike<number>, f: Float64Array): void {
  const p = assemble(prob, vec)
  for (const g of prob.groups) {
    if (prob.model === 'classical') {
      const ev = createClassicalEvaluator({ lambdaTotal: p.lambdaTotal, coupling: p.coupling, temperatureK: g.T })
      for (let j = 0; j < g.x.length; j++) f[g.idx[j]!] = ev.log10Rate(g.x[j]!)
    }
    else {
      const ev = createSemiclassicalEvaluator({ lambdaSolvent: p.lambdaSolvent, lambdaInternal: p.lambdaInternal, vibrationEnergy: p.vibrationEnergy, coupling: p.coupling, temperatureK: g.T })
      ev.run(g.x, g.out)
      for (let j = 0; j < g.x.length; j++) f[g.idx[j]!] = g.out[j]!
    }
  }
}

function chiSquared (prob: Problem, f: Float64Array): number {
  let chi = 0
  for (let i = 0; i < prob.n; i++) { const r = (prob.y[i]! - f[i]!) * prob.w[i]!; chi += r * r }
  return chi
}

/** Optimal log10 V for the other parameters (χ² is quadratic in it), clamped to its bounds; mutates vec. */
function profileCoupling (prob: Problem, vec: number[], f: Float64Array): void {
  const ci = prob.free.indexOf('coupling')
  if (ci < 0) return
  let num = 0; let den = 0
  for (let i = 0; i < prob.n; i++) { const w2 = prob.w[i]! ** 2; num += w2 * (prob.y[i]! - f[i]!); den += w2 }
  // log10 k = g + 2 log10 V, so the shift of log10 V is half the weighted mean residual
  const v = vec[ci]! + num / den / 2
  vec[ci] = Math.min(Math.max(v, prob.lo[ci]!), prob.hi[ci]!)
}

interface Run { vec: number[], chi: number, iterations: number, status: 'converged' | 'stalled', active: boolean[] }

/** Relative finite-difference step for each free parameter (the coupling is already on a log scale). */
function stepFor (prob: Problem, vec: number[], j: number, rel: number): number {
  return rel * Math.max(Math.abs(vec[j]!), prob.free[j] === 'coupling' ? 1 : 0.05)
}

/**
 * Jacobian of the weighted model, w_i ∂f_i/∂v_j, by finite differences that never leave the box:
 * central where both neighbours are inside, one-sided inward at a bound.
 */
function jacobian (prob: Problem, vec: number[], f0: Float64Array, central: boolean, J: Float64Array[], tmp: Float64Array, tmp2: Float64Array): number {
  let evals = 0
  for (let j = 0; j < vec.length; j++) {
    const h = stepFor(prob, vec, j, central ? 1e-5 : 1e-7)
    const up = vec[j]! + h <= prob.hi[j]!
    const dn = vec[j]! - h >= prob.lo[j]!
    const Jj = J[j]!
    if (central && up && dn) {
      const a = vec.slice(); a[j] = vec[j]! + h; model(prob, a, tmp)
      const b = vec.slice(); b[j] = vec[j]! - h; model(prob, b, tmp2)
      for (let i = 0; i < prob.n; i++) Jj[i] = prob.w[i]! * (tmp[i]! - tmp2[i]!) / (2 * h)
      evals += 2
    }
    else {
      const s = up ? h : -h
      const a = vec.slice(); a[j] = vec[j]! + s; model(prob, a, tmp)
      for (let i = 0; i < prob.n; i++) Jj[i] = prob.w[i]! * (tmp[i]! - f0[i]!) / s
      evals++
    }
  }
  return evals
}

const GTOL = 1e-6
const MAX_ITERATIONS = 300

/** Bounded Levenberg–Marquardt from one start. */
function lmRun (prob: Problem, start: number[]): Run {
  const k = start.length; const n = prob.n
  let vec = start.slice()
  const f = new Float64Array(n); const ft = new Float64Array(n); const tmp = new Float64Array(n); const tmp2 = new Float64Array(n)
  const J = Array.from({ length: k }, () => new Float64Array(n))
  model(prob, vec, f)
  let chi = chiSquared(prob, f)
  let mu = -1
  let iterations = 0
  let active = new Array<boolean>(k).fill(false)
  let status: Run['status'] = 'stalled'
  const r = new Float64Array(n)
  while (iterations < MAX_ITERATIONS) {
    iterations++
    for (let i = 0; i < n; i++) r[i] = (prob.y[i]! - f[i]!) * prob.w[i]!
    jacobian(prob, vec, f, false, J, tmp, tmp2)
    // normal equations A = JᵀJ, b = Jᵀr (b is minus half the gradient of χ²)
    const A = Array.from({ length: k }, () => new Array<number>(k).fill(0)); const b = new Array<number>(k).fill(0)
    for (let a = 0; a < k; a++) {
      const Ja = J[a]!
      let s = 0; for (let i = 0; i < n; i++) s += Ja[i]! * r[i]!
      b[a] = s
      for (let c = a; c < k; c++) { const Jc = J[c]!; let t = 0; for (let i = 0; i < n; i++) t += Ja[i]! * Jc[i]!; A[a]![c] = t; A[c]![a] = t }
    }
    // active set: held at a bound by a gradient that points outward
    active = vec.map((v, j) => (v <= prob.lo[j]! && b[j]! < 0) || (v >= prob.hi[j]! && b[j]! > 0))
    const freeIdx = [...Array(k).keys()].filter(j => !active[j] && A[j]![j]! > 0)
    // gradient test on the free columns: cosine between the residual and each column
    const rn = Math.sqrt(chi)
    let cos = 0
    for (const j of freeIdx) cos = Math.max(cos, Math.abs(b[j]!) / (Math.sqrt(A[j]![j]!) * rn || 1))
    if (chi <= 1e-26 * n || freeIdx.length === 0 || cos <= GTOL) { status = 'converged'; break }
    if (mu < 0) mu = 1e-3 * Math.max(...freeIdx.map(j => A[j]![j]!))
    let accepted = false
    for (let tries = 0; tries < 30; tries++) {
      const m = freeIdx.length
      const M = new Matrix(m, m); const rhs = new Matrix(m, 1)
      freeIdx.forEach((ja, a) => {
        freeIdx.forEach((jc, c) => M.set(a, c, A[ja]![jc]! + (a === c ? mu * Math.max(A[ja]![ja]!, 1e-12) : 0)))
        rhs.set(a, 0, b[ja]!)
      })
      let delta: Matrix
      try { delta = solve(M, rhs) }
      catch { mu *= 10; continue }
      const trial = vec.slice()
      freeIdx.forEach((j, a) => { trial[j] = Math.min(Math.max(vec[j]! + delta.get(a, 0), prob.lo[j]!), prob.hi[j]!) })
      model(prob, trial, ft)
      const tchi = chiSquared(prob, ft)
      if (Number.isFinite(tchi) && tchi < chi) {
        const dChi = chi - tchi
        let step = 0
        for (let j = 0; j < k; j++) step = Math.max(step, Math.abs(trial[j]! - vec[j]!) / (Math.abs(vec[j]!) + 1e-3))
        vec = trial; chi = tchi; f.set(ft)
        mu = Math.max(mu / 3, 1e-12)
        accepted = true
        // χ² and the step have stopped moving: take it as converged only if the gradient is also small
        // (a looser test: with finite differences the last digits of the gradient are noise)
        if (dChi <= 1e-12 * chi && step <= 1e-9) {
          status = 'stalled'
          const cosNow = gradientCosine(prob, vec, f, active, J, tmp, tmp2)
          if (cosNow <= 1e-3) status = 'converged'
          return { vec, chi, iterations, status, active: activeAt(prob, vec, f, J, tmp, tmp2) }
        }
        break
      }
      mu *= 4
      if (mu > 1e16) break
    }
    if (!accepted) {
      // no step lowers χ²: a minimum if the gradient says so, otherwise stalled
      const cosNow = gradientCosine(prob, vec, f, active, J, tmp, tmp2)
      status = cosNow <= 1e-3 ? 'converged' : 'stalled'
      break
    }
  }
  return { vec, chi, iterations, status, active: activeAt(prob, vec, f, J, tmp, tmp2) }
}

/** Largest gradient cosine over the columns not held at a bound, from a central-difference Jacobian. */
function gradientCosine (prob: Problem, vec: number[], f: Float64Array, active: boolean[], J: Float64Array[], tmp: Float64Array, tmp2: Float64Array): number {
  jacobian(prob, vec, f, true, J, tmp, tmp2)
  const chi = chiSquared(prob, f)
  let cos = 0
  for (let j = 0; j < vec.length; j++) {
    if (active[j]) continue
    let b = 0; let a = 0
    for (let i = 0; i < prob.n; i++) { b += J[j]![i]! * (prob.y[i]! - f[i]!) * prob.w[i]!; a += J[j]![i]! ** 2 }
    if (a > 0) cos = Math.max(cos, Math.abs(b) / Math.sqrt(a * chi || 1))
  }
  return cos
}

/** Which parameters sit at a bound with the gradient pushing outward. */
function activeAt (prob: Problem, vec: number[], f: Float64Array, J: Float64Array[], tmp: Float64Array, tmp2: Float64Array): boolean[] {
  jacobian(prob, vec, f, false, J, tmp, tmp2)
  return vec.map((v, j) => {
    const atLo = v <= prob.lo[j]! + 1e-12 * Math.max(1, Math.abs(v)); const atHi = v >= prob.hi[j]! - 1e-12 * Math.max(1, Math.abs(v))
    if (!atLo && !atHi) return false
    let b = 0
    for (let i = 0; i < prob.n; i++) b += J[j]![i]! * (prob.y[i]! - f[i]!) * prob.w[i]!
    return (atLo && b <= 0) || (atHi && b >= 0)
  })
}

/** Coarse values of each parameter for the scan of starting points (eV), inside the bounds. */
const SCAN: Record<Exclude<ParameterName, 'coupling'>, number[]> = {
  lambdaTotal: [0.05, 0.12, 0.25, 0.4, 0.6, 0.85, 1.15, 1.6, 2.3, 3.5],
  lambdaSolvent: [0.05, 0.15, 0.3, 0.5, 0.75, 1.1, 1.6, 2.5],
  lambdaInternal: [0, 0.1, 0.25, 0.5, 0.9, 1.6],
  vibrationEnergy: [0.05, 0.1, 0.17, 0.28, 0.45]
}
/** Points used for the scan and the first runs: a stride through the points sorted by ΔG° (bounded work). */
const SCAN_POINTS = 160

function subProblem (prob: Problem): Problem {
  if (prob.n <= SCAN_POINTS) return prob
  const order = Array.from({ length: prob.n }, (_, i) => i)
  const x = new Float64Array(prob.n)
  for (const g of prob.groups) g.idx.forEach((i, j) => { x[i] = g.x[j]! })
  order.sort((a, b) => x[a]! - x[b]!)
  const pick: number[] = []
  for (let t = 0; t < SCAN_POINTS; t++) pick.push(order[Math.floor(t * prob.n / SCAN_POINTS)]!)
  const y = Float64Array.from(pick, i => prob.y[i]!); const w = Float64Array.from(pick, i => prob.w[i]!)
  const Ts = new Map<number, number[]>()
  const Tof = new Float64Array(prob.n)
  for (const g of prob.groups) for (const i of g.idx) Tof[i] = g.T
  pick.forEach((i, j) => { const l = Ts.get(Tof[i]!); if (l) l.push(j); else Ts.set(Tof[i]!, [j]) })
  const groups: Group[] = [...Ts].map(([T, list]) => ({ T, idx: Int32Array.from(list), x: Float64Array.from(list, j => x[pick[j]!]!), out: new Float64Array(list.length) }))
  return { ...prob, n: pick.length, y, w, groups }
}

/** Starting vectors: the caller's, then the best distinct points of the scan. */
function starts (prob: Problem, first: number[], count: number): number[][] {
  const f = new Float64Array(prob.n)
  const axes = prob.free.map((k, j) => k === 'coupling' ? [first[j]!] : SCAN[k].filter(v => v >= prob.lo[j]! && v <= prob.hi[j]!))
  const scored: { vec: number[], chi: number }[] = []
  const rec = (j: number, cur: number[]) => {
    if (j === axes.length) {
      const v = cur.slice()
      model(prob, v, f); profileCoupling(prob, v, f); model(prob, v, f)
      const chi = chiSquared(prob, f)
      if (Number.isFinite(chi)) scored.push({ vec: v, chi })
      return
    }
    for (const a of axes[j]!) { cur[j] = a; rec(j + 1, cur) }
  }
  rec(0, first.slice())
  scored.sort((a, b) => a.chi - b.chi)
  const out = [first]
  for (const s of scored) {
    if (out.length > count) break
    // distinct: differ from every chosen start by more than a fifth of the range in some parameter
    if (out.every(o => o.some((v, j) => Math.abs(v - s.vec[j]!) > 0.2 * (prob.hi[j]! - prob.lo[j]!) || (prob.free[j] !== 'coupling' && Math.abs(v - s.vec[j]!) > 0.5 * Math.max(v, s.vec[j]!))))) out.push(s.vec)
  }
  return out
}

/** Fit the model to the points. Throws PhysicsInputError for bad or under-determined requests. */
export function fitRates (req: FitRequest): FitResult {
  const { prob, Tmin, Tmax } = prepare(req)
  const n = prob.n; const k = prob.free.length
  const start = { ...DEFAULT_INITIAL, ...(req.initial ?? {}), ...prob.fixed } as Record<ParameterName, number>
  if (req.model === 'semiclassical' && req.initial && (req.initial.lambdaInternal !== undefined || req.initial.vibrationEnergy !== undefined)) {
    const c = new IssueCollector(); checkHuangRhys(c, start.lambdaInternal, start.vibrationEnergy, '/initial/lambdaInternal'); c.throwIfAny()
  }
  const first = prob.free.map((name, j) => {
    const v = name === 'coupling' ? Math.log10(start.coupling) : start[name]
    return Math.min(Math.max(v, prob.lo[j]!), prob.hi[j]!)
  })
  const f = new Float64Array(n)
  if (req.initial?.coupling === undefined) { model(prob, first, f); profileCoupling(prob, first, f) }

  // The scan and the first runs use at most SCAN_POINTS points; the best runs are then finished on all of them.
  const sub = subProblem(prob)
  const runs = starts(sub, first, 3).map(s => lmRun(sub, s))
  let iterations = runs.reduce((s, r) => s + r.iterations, 0)
  let startCount = runs.length
  let best: Run
  if (sub === prob) {
    best = runs.reduce((a, b) => b.chi < a.chi ? b : a)
  }
  else {
    const order = runs.slice().sort((a, b) => a.chi - b.chi)
    const finals = order.slice(0, 2).map(r => lmRun(prob, r.vec))
    iterations += finals.reduce((s, r) => s + r.iterations, 0)
    best = finals.reduce((a, b) => b.chi < a.chi ? b : a)
    // a stalled finish gets one more try from the caller's own start on all the points
    if (best.status === 'stalled') {
      const again = lmRun(prob, first); iterations += again.iterations; startCount++
      if (again.chi < best.chi || (again.status === 'converged' && again.chi <= best.chi * (1 + 1e-9))) best = again
    }
  }
  // Prefer a converged run when a stalled one is better only by rounding.
  const conv = runs.filter(r => r.status === 'converged' && r.chi <= best.chi * (1 + 1e-9))
  if (best.status === 'stalled' && conv.length && sub === prob) best = conv[0]!
  const vec = best.vec; const chi = best.chi
  // a parameter held at a bound sits on it (within rounding): report the bound itself
  vec.forEach((v, j) => { if (best.active[j]) vec[j] = Math.abs(v - prob.lo[j]!) <= Math.abs(v - prob.hi[j]!) ? prob.lo[j]! : prob.hi[j]! })
  const atBound = prob.free.filter((_, j) => best.active[j])
  const status: FitStatus = best.status === 'stalled' ? 'stalled' : atBound.length ? 'at-bound' : 'converged'

  const dof = n - k
  const chiRed = dof > 0 ? chi / dof : null
  const warnings: string[] = []
  const scale = prob.hasSigma ? 1 : (chiRed ?? NaN)
  if (!prob.hasSigma && dof === 0) warnings.push('No degrees of freedom are left (as many points as free parameters): standard errors cannot be estimated.')
  if (status === 'stalled') warnings.push(`The optimizer stopped without confirming a minimum after ${iterations} iterations from ${startCount} starting points: the values below are the best found, not a fit result. Fix a parameter, give starting values or add points.`)
  const { cov, noEffect } = covariance(prob, vec, best.active)
  const p = assemble(prob, vec)
  const parameters: FitResult['parameters'] = {}
  const bounds: FitResult['bounds'] = {}
  for (const name of MODEL_PARAMETERS[req.model] as readonly ParameterName[]) {
    const fi = prob.free.indexOf(name)
    if (fi < 0) { parameters[name] = { value: prob.fixed[name]!, stderr: 0, fixed: true, ...(name === 'coupling' ? { log10Stderr: 0 } : {}) }; continue }
    bounds[name] = name === 'coupling' ? [10 ** prob.lo[fi]!, 10 ** prob.hi[fi]!] : [prob.lo[fi]!, prob.hi[fi]!]
    const variance = cov ? cov[fi]! * scale : NaN
    const se = !best.active[fi] && Number.isFinite(variance) && variance >= 0 ? Math.sqrt(variance) : null
    const value = p[name]
    const edge = best.active[fi] ? (vec[fi]! <= prob.lo[fi]! ? 'lower' : 'upper') : undefined
    if (name === 'coupling') parameters[name] = { value, stderr: se === null ? null : value * Math.LN10 * se, log10Stderr: se, fixed: false }
    else parameters[name] = { value, stderr: se, fixed: false }
    if (edge) parameters[name]!.atBound = edge
    const label = PARAMETER_LABELS[name]
    if (edge) {
      const bv = bounds[name]![edge === 'lower' ? 0 : 1]
      warnings.push(`${cap(label)} ended at the ${edge} bound of its allowed range (${bv} eV): the best fit wants it ${edge === 'lower' ? 'lower' : 'higher'}; its standard error is not given and the others' come from the fit with it held there.`)
    }
    else if (noEffect[fi]) {
      warnings.push(name === 'vibrationEnergy' && p.lambdaInternal === 0
        ? 'The mode energy ħω has no effect while λ_i = 0 (the classical limit): it is not determined; fix it.'
        : `The data do not depend on ${label} here: it is not determined; fix it.`)
    }
    else if (se === null && dof > 0) warnings.push(`The data cannot constrain ${label}: fix it or add points that span more driving force.`)
    // common practice: call a parameter poorly determined past 50 % relative error (a factor of 2 for V)
    else if (se !== null && name !== 'coupling' && se > 0.5 * Math.abs(value)) warnings.push(`${cap(label)} is poorly determined: its standard error is more than half its value.`)
    else if (se !== null && name === 'coupling' && se > Math.log10(2)) warnings.push('The coupling is poorly determined: its standard error spans more than a factor of two.')
  }
  if (chiRed !== null && prob.hasSigma && chiRed > 4) warnings.push(`χ²_red = ${chiRed.toFixed(2)}: the model does not describe these points within their uncertainties.`)
  model(prob, vec, f)
  const residuals = Array.from(f, (v, i) => prob.y[i]! - v)
  return {
    model: req.model,
    temperatureK: req.temperatureK ?? (Tmin === Tmax ? Tmin : null),
    temperatureRangeK: [Tmin, Tmax],
    parameters, chiSquared: chi, chiSquaredReduced: chiRed, degreesOfFreedom: dof, residuals,
    uncertaintyKind: prob.hasSigma ? 'absolute' : 'scaled',
    status, atBound, converged: status !== 'stalled', iterations, starts: startCount, bounds, warnings
  }
}

function cap (s: string): string { return s.charAt(0).toUpperCase() + s.slice(1) }

/**
 * Diagonal of (JᵀWJ)⁻¹ over the parameters that are neither held at a bound nor without effect
 * (central differences, inward at a bound); null entries where the reduced matrix is singular.
 */
function covariance (prob: Problem, vec: number[], active: boolean[]): { cov: number[] | null, noEffect: boolean[] } {
  const n = prob.n; const k = vec.length
  const f = new Float64Array(n); const tmp = new Float64Array(n); const tmp2 = new Float64Array(n)
  model(prob, vec, f)
  const J = Array.from({ length: k }, () => new Float64Array(n))
  jacobian(prob, vec, f, true, J, tmp, tmp2)
  const norms = J.map(c => Math.sqrt(c.reduce((s, v) => s + v * v, 0)))
  const maxNorm = Math.max(...norms, 0)
  const noEffect = norms.map(v => !(v > 1e-9 * Math.max(maxNorm, 1e-300)) || v === 0)
  const keep = [...Array(k).keys()].filter(j => !active[j] && !noEffect[j])
  const out = new Array<number>(k).fill(NaN)
  if (!keep.length) return { cov: out, noEffect }
  const A = new Matrix(keep.length, keep.length)
  keep.forEach((a, i) => keep.forEach((c, j) => {
    let s = 0; for (let t = 0; t < n; t++) s += J[a]![t]! * J[c]![t]!
    A.set(i, j, s)
  }))
  // scale to unit diagonal before inverting so that the test for singularity is about correlation, not units
  const d = keep.map((_, i) => Math.sqrt(A.get(i, i)))
  const C = new Matrix(keep.length, keep.length)
  keep.forEach((_, i) => keep.forEach((__, j) => C.set(i, j, A.get(i, j) / (d[i]! * d[j]!))))
  try {
    const inv = solve(C, Matrix.eye(keep.length))
    keep.forEach((j, i) => {
      const v = inv.get(i, i)
      // a correlation matrix whose inverse has a diagonal above 1e10 is singular to working precision
      out[j] = v > 0 && v < 1e10 ? v / (d[i]! * d[i]!) : NaN
    })
  }
  catch { /* singular: every entry stays NaN */ }
  return { cov: out, noEffect }
}
