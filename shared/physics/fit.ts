/**
 * Weighted non-linear least squares of log10 k against ΔG° for the classical or semi-classical
 * expression, through ml-levenberg-marquardt. Any subset of parameters can be fixed; the coupling
 * is fitted as log10 V. Standard errors come from the covariance (JᵀWJ)⁻¹ at the optimum:
 * absolute when every point has an uncertainty, otherwise scaled by the reduced χ².
 */
import { levenbergMarquardt } from 'ml-levenberg-marquardt'
import { Matrix, inverse } from 'ml-matrix'
import { IssueCollector, PhysicsInputError } from './errors'
import { checkClassical, checkSemiclassical, createClassicalEvaluator, createSemiclassicalEvaluator, type RateEvaluator } from './rates'

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
/** Bounds the optimizer keeps each parameter in (coupling as log10 V). */
const BOUNDS: Record<ParameterName, [number, number]> = {
  lambdaTotal: [1e-3, 5], lambdaSolvent: [1e-3, 5], lambdaInternal: [0, 5], vibrationEnergy: [5e-3, 1], coupling: [-9, 0]
}
export const MAX_FIT_POINTS = 20000

export interface FitPoint {
  deltaG: number
  log10Rate?: number
  log10RateUncertainty?: number
  rate?: number
  rateUncertainty?: number
}

export interface FitRequest {
  model: ModelName
  temperatureK: number
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
}

export interface FitResult {
  model: ModelName
  temperatureK: number
  parameters: Partial<Record<ParameterName, FittedParameter>>
  chiSquared: number
  /** χ² / (n − p); null when there are no degrees of freedom left. */
  chiSquaredReduced: number | null
  degreesOfFreedom: number
  /** Observed minus fitted log10 k, in the order of the points. */
  residuals: number[]
  /** 'absolute' when every point carried an uncertainty; 'scaled' by √χ²_red otherwise. */
  uncertaintyKind: 'absolute' | 'scaled'
  converged: true
  iterations: number
  /** Plain-language cautions: unconstrained parameters, values at bounds or outside usual ranges. */
  warnings: string[]
}

interface Prepared {
  x: Float64Array
  y: Float64Array
  sigma: Float64Array | null
  free: ParameterName[]
  fixed: Partial<Record<ParameterName, number>>
}

function prepare (req: FitRequest): Prepared {
  const c = new IssueCollector()
  if (req.model !== 'classical' && req.model !== 'semiclassical') c.add('/model', 'Model must be "classical" or "semiclassical"')
  c.positive(req.temperatureK, '/temperatureK', 'Temperature')
  if (!Array.isArray(req.points)) c.add('/points', 'Points must be an array')
  c.throwIfAny()
  const names = MODEL_PARAMETERS[req.model] as readonly ParameterName[]
  const fixed = { ...(req.fixed ?? {}) }
  for (const [k, v] of Object.entries(fixed)) {
    if (!names.includes(k as ParameterName)) c.add(`/fixed/${k}`, `Unknown parameter for the ${req.model} model; expected one of ${names.join(', ')}`)
    else if (k === 'lambdaInternal') c.nonNegative(v, `/fixed/${k}`, k)
    else c.positive(v, `/fixed/${k}`, k)
  }
  for (const [k, v] of Object.entries(req.initial ?? {})) {
    if (!names.includes(k as ParameterName)) c.add(`/initial/${k}`, `Unknown parameter for the ${req.model} model; expected one of ${names.join(', ')}`)
    else if (k === 'lambdaInternal') c.nonNegative(v, `/initial/${k}`, k)
    else c.positive(v, `/initial/${k}`, k)
  }
  const n = req.points.length
  if (n > MAX_FIT_POINTS) c.add('/points', `Too many points: ${n} (at most ${MAX_FIT_POINTS})`)
  c.throwIfAny()
  const x = new Float64Array(n); const y = new Float64Array(n); const s = new Float64Array(n)
  let withSigma = 0
  req.points.forEach((p, i) => {
    const at = `/points/${i}`
    if (typeof p !== 'object' || p === null) { c.add(at, 'Each point must be an object'); return }
    c.finite(p.deltaG, `${at}/deltaG`, 'Driving force')
    x[i] = p.deltaG
    if (p.log10Rate !== undefined) {
      if (c.finite(p.log10Rate, `${at}/log10Rate`, 'log10 rate')) y[i] = p.log10Rate
      if (p.log10RateUncertainty !== undefined && c.positive(p.log10RateUncertainty, `${at}/log10RateUncertainty`, 'Uncertainty of log10 rate')) {
        s[i] = p.log10RateUncertainty; withSigma++
      }
    } else if (p.rate !== undefined) {
      if (c.positive(p.rate, `${at}/rate`, 'Rate')) y[i] = Math.log10(p.rate)
      if (p.rateUncertainty !== undefined && c.positive(p.rateUncertainty, `${at}/rateUncertainty`, 'Rate uncertainty')) {
        // first-order propagation: σ(log10 k) = σ_k / (k ln 10)
        s[i] = p.rateUncertainty / (p.rate * Math.LN10); withSigma++
      }
    } else {
      c.add(at, 'Each point needs log10Rate or rate')
    }
  })
  c.throwIfAny()
  if (withSigma > 0 && withSigma < n) {
    c.add('/points', 'Give an uncertainty for every point or for none, so that the weights mean one thing')
  }
  const free = names.filter(k => fixed[k] === undefined)
  if (free.length === 0) c.add('/fixed', 'Every parameter is fixed: there is nothing to fit')
  else if (n < free.length) c.add('/points', `Under-determined fit: ${n} point(s) for ${free.length} free parameter(s); fix parameters or add points`)
  c.throwIfAny()
  return { x, y, sigma: withSigma === n ? s : null, free, fixed }
}

/** Full parameter object from the free vector (coupling as log10 V inside the vector). */
function assemble (model: ModelName, free: ParameterName[], vec: ArrayLike<number>, fixed: Partial<Record<ParameterName, number>>): Record<ParameterName, number> {
  const p = { ...DEFAULT_INITIAL, ...fixed } as Record<ParameterName, number>
  free.forEach((k, i) => { p[k] = k === 'coupling' ? 10 ** vec[i]! : vec[i]! })
  void model
  return p
}

function evaluator (model: ModelName, p: Record<ParameterName, number>, temperatureK: number): RateEvaluator {
  return model === 'classical'
    ? createClassicalEvaluator({ lambdaTotal: p.lambdaTotal, coupling: p.coupling, temperatureK })
    : createSemiclassicalEvaluator({ lambdaSolvent: p.lambdaSolvent, lambdaInternal: p.lambdaInternal, vibrationEnergy: p.vibrationEnergy, coupling: p.coupling, temperatureK })
}

function chiSquared (pre: Prepared, model: ModelName, vec: number[], T: number): number {
  const ev = evaluator(model, assemble(model, pre.free, vec, pre.fixed), T)
  let chi = 0
  for (let i = 0; i < pre.x.length; i++) {
    const r = (pre.y[i]! - ev.log10Rate(pre.x[i]!)) / (pre.sigma ? pre.sigma[i]! : 1)
    chi += r * r
  }
  return chi
}

const CHUNK_ITERATIONS = 8
const MAX_CHUNKS = 40

/** Fit the model to the points. Throws PhysicsInputError for bad, under-determined or non-converging fits. */
export function fitRates (req: FitRequest): FitResult {
  const pre = prepare(req)
  const { model, temperatureK: T } = req
  const n = pre.x.length
  const k = pre.free.length
  const start: Record<ParameterName, number> = { ...DEFAULT_INITIAL, ...(req.initial ?? {}), ...pre.fixed }
  if (model === 'classical') checkClassical({ lambdaTotal: start.lambdaTotal, coupling: start.coupling, temperatureK: T })
  else checkSemiclassical({ ...start, temperatureK: T } as never)

  let vec = pre.free.map(name => name === 'coupling' ? Math.log10(start.coupling) : start[name])
  // Scale the starting coupling to the data unless the caller gave one: log k ∝ 2 log V.
  const ci = pre.free.indexOf('coupling')
  if (ci >= 0 && req.initial?.coupling === undefined) {
    const ev = evaluator(model, assemble(model, pre.free, vec, pre.fixed), T)
    let mean = 0
    for (let i = 0; i < n; i++) mean += pre.y[i]! - ev.log10Rate(pre.x[i]!)
    vec[ci] = Math.min(Math.max(vec[ci]! + mean / n / 2, BOUNDS.coupling[0]), BOUNDS.coupling[1])
  }
  // Points are passed pre-divided by σ (x is the point's index) instead of through the package's
  // `weights` option: in ml-levenberg-marquardt 5.1 the step weights residuals by 1/σ² but the
  // error it compares steps by is weighted by σ², which stalls the damping on weighted data.
  const sig = pre.sigma
  const paramFn = (v: number[]) => {
    const ev = evaluator(model, assemble(model, pre.free, v, pre.fixed), T)
    return sig
      ? (i: number) => ev.log10Rate(pre.x[i]!) / sig[i]!
      : (i: number) => ev.log10Rate(pre.x[i]!)
  }
  const minValues = pre.free.map(p => BOUNDS[p][0])
  const maxValues = pre.free.map(p => BOUNDS[p][1])
  let chi = chiSquared(pre, model, vec, T)
  let iterations = 0
  let converged = false
  const data = {
    x: Float64Array.from(pre.x, (_, i) => i),
    y: sig ? Float64Array.from(pre.y, (v, i) => v / sig[i]!) : pre.y
  }
  // ml-levenberg-marquardt stops only at a fixed iteration count or an absolute error, so it is
  // run in short chunks and convergence is judged here on the change in χ² and in the parameters.
  for (let chunk = 0; chunk < MAX_CHUNKS && !converged; chunk++) {
    const res = levenbergMarquardt(data, paramFn, {
      initialValues: vec,
      damping: 1e-2,
      gradientDifference: 1e-6,
      maxIterations: CHUNK_ITERATIONS,
      errorTolerance: 0,
      minValues,
      maxValues
    })
    iterations += res.iterations
    const next = Array.from(res.parameterValues)
    const nextChi = chiSquared(pre, model, next, T)
    const dChi = chi - nextChi
    const dPar = Math.max(...next.map((v, i) => Math.abs(v - vec[i]!) / Math.max(Math.abs(v), 1e-3)))
    if (nextChi <= chi) { vec = next; chi = nextChi }
    converged = (Math.abs(dChi) <= 1e-9 * chi + 1e-18 && dPar < 1e-6) || chi < 1e-24
  }
  if (!converged || !Number.isFinite(chi)) {
    throw new PhysicsInputError([{ path: '/points', message: `The fit did not converge in ${iterations} iterations; fix a parameter, give better starting values or add points` }])
  }

  const dof = n - k
  const chiRed = dof > 0 ? chi / dof : null
  const warnings: string[] = []
  const cov = covariance(pre, model, vec, T)
  const scale = pre.sigma ? 1 : (chiRed ?? NaN)
  if (!pre.sigma && dof === 0) warnings.push('No degrees of freedom are left (as many points as free parameters): standard errors cannot be estimated.')
  const parameters: FitResult['parameters'] = {}
  for (const name of MODEL_PARAMETERS[model] as readonly ParameterName[]) {
    const fi = pre.free.indexOf(name)
    if (fi < 0) { parameters[name] = { value: pre.fixed[name]!, stderr: 0, fixed: true, ...(name === 'coupling' ? { log10Stderr: 0 } : {}) }; continue }
    const variance = cov ? cov[fi]![fi]! * scale : NaN
    const se = Number.isFinite(variance) && variance >= 0 ? Math.sqrt(variance) : null
    const value = name === 'coupling' ? 10 ** vec[fi]! : vec[fi]!
    if (name === 'coupling') {
      parameters[name] = { value, stderr: se === null ? null : value * Math.LN10 * se, log10Stderr: se, fixed: false }
    } else {
      parameters[name] = { value, stderr: se, fixed: false }
    }
    if (se === null && dof > 0) warnings.push(`The data cannot constrain ${name}: fix it or add points that span more driving force.`)
    // common practice: call a parameter poorly determined past 50 % relative error (a factor of 2 for V)
    else if (se !== null && name !== 'coupling' && se > 0.5 * Math.abs(value)) warnings.push(`${name} is poorly determined: its standard error is more than half its value.`)
    else if (se !== null && name === 'coupling' && se > Math.log10(2)) warnings.push('The coupling is poorly determined: its standard error spans more than a factor of two.')
    const raw = vec[fi]!
    if (Math.abs(raw - BOUNDS[name][0]) < 1e-9 || Math.abs(raw - BOUNDS[name][1]) < 1e-9) {
      warnings.push(`${name} ended at the edge of its allowed range; the fit may not have found a true minimum.`)
    }
  }
  if (chiRed !== null && pre.sigma && chiRed > 4) warnings.push(`χ²_red = ${chiRed.toFixed(2)}: the model does not describe these points within their uncertainties.`)
  const ev = evaluator(model, assemble(model, pre.free, vec, pre.fixed), T)
  const residuals = Array.from(pre.x, (x, i) => pre.y[i]! - ev.log10Rate(x))
  return {
    model, temperatureK: T, parameters, chiSquared: chi, chiSquaredReduced: chiRed, degreesOfFreedom: dof, residuals,
    uncertaintyKind: pre.sigma ? 'absolute' : 'scaled', converged: true, iterations, warnings
  }
}

/** (JᵀWJ)⁻¹ from a central-difference Jacobian at the optimum; null when it is singular. */
function covariance (pre: Prepared, model: ModelName, vec: number[], T: number): number[][] | null {
  const n = pre.x.length; const k = vec.length
  const J = new Matrix(n, k)
  for (let j = 0; j < k; j++) {
    const h = 1e-5 * Math.max(Math.abs(vec[j]!), 1e-2)
    const up = vec.slice(); up[j] = vec[j]! + h
    const dn = vec.slice(); dn[j] = vec[j]! - h
    const eu = evaluator(model, assemble(model, pre.free, up, pre.fixed), T)
    const ed = evaluator(model, assemble(model, pre.free, dn, pre.fixed), T)
    for (let i = 0; i < n; i++) {
      const w = pre.sigma ? 1 / pre.sigma[i]! : 1
      J.set(i, j, w * (eu.log10Rate(pre.x[i]!) - ed.log10Rate(pre.x[i]!)) / (2 * h))
    }
  }
  const A = J.transpose().mmul(J)
  try {
    const inv = inverse(A)
    const arr = inv.to2DArray()
    // A near-singular JᵀWJ inverts to enormous or negative variances: treat as unconstrained.
    for (let i = 0; i < k; i++) if (!(arr[i]![i]! > 0) || arr[i]![i]! > 1e12) arr[i]![i] = NaN
    return arr
  } catch {
    return null
  }
}
