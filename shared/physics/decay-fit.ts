/**
 * Fitting decay traces with the rate fits' optimizer (fit-lm.ts: bounded Levenberg–Marquardt, the same
 * convergence tests, status and covariance): starting values from the trace itself, a few starts on a thinned
 * trace for bi-exponentials, the best finished on every point. Lifetimes come out ordered (τ₁ < τ₂).
 */
import { covariance, lmRun, type LsqProblem, type Run } from './fit-lm'
import {
  decayCurve,
  irfHistogram,
  parameterNames,
  TIME_UNITS,
  PARAMETER_WORDS,
  type DecayParam,
  type IrfHistogram
} from './decay'
import { checkDecayRequest, type DecayFitRequest } from './decay-check'
import type { FitStatus } from './fit-types'

export type { DecayFitRequest } from './decay-check'
export interface DecayParameter {
  value: number
  stderr: number | null
  fixed: boolean
  atBound?: 'lower' | 'upper'
}
export interface DecayLifetime {
  name: 'tau1' | 'tau2'
  value: number
  stderr: number | null
  amplitude: number
  /** This component's share of Σ|aᵢ|τᵢ (its share of the decay's area). */
  areaFraction: number
  /** 1/τ in s⁻¹, and its standard error σ_τ/τ². */
  rate: { value: number, stderr: number | null }
}
export interface DecayFitResult {
  model: DecayFitRequest['model']
  irf: 'none' | 'gaussian' | 'measured'
  weighting: 'poisson' | 'given' | 'none'
  timeUnit: DecayFitRequest['timeUnit']
  parameters: Partial<Record<DecayParam, DecayParameter>>
  lifetimes: DecayLifetime[]
  chiSquared: number
  chiSquaredReduced: number | null
  degreesOfFreedom: number
  uncertaintyKind: 'absolute' | 'scaled'
  status: FitStatus
  atBound: DecayParam[]
  iterations: number
  fitted: number[]
  /** Observed minus fitted, in signal units. */
  residuals: number[]
  warnings: string[]
}

const THIN_TO = 1500

function median (xs: number[]): number {
  const s = xs.slice().sort((a, b) => a - b)
  return s[Math.floor(s.length / 2)]!
}

/** A least-squares problem over a subset of the points. */
function problemOf (
  req: DecayFitRequest,
  irf: DecayFitResult['irf'],
  names: DecayParam[],
  free: DecayParam[],
  fixed: Partial<Record<DecayParam, number>>,
  idx: number[],
  w: Float64Array,
  lo: number[],
  hi: number[],
  floors: number[],
  hist?: IrfHistogram
): LsqProblem {
  const t = Float64Array.from(idx, i => req.times[i]!)
  const p = Object.fromEntries(names.map(k => [k, fixed[k] ?? 0])) as Record<DecayParam, number>
  return {
    n: idx.length,
    y: Float64Array.from(idx, i => req.signal[i]!),
    w: Float64Array.from(idx, i => w[i]!),
    lo,
    hi,
    evaluate: (vec, f) => {
      free.forEach((k, j) => {
        p[k] = vec[j]!
      })
      decayCurve(req.model, irf, p, t, f, hist)
    },
    stepFloor: j => floors[j]!
  }
}

/** Starting values read off the trace: offset from its tail, time zero and width from the rise, τ from the 1/e point. */
function guess (req: DecayFitRequest, irf: DecayFitResult['irf'], hist?: IrfHistogram): Record<DecayParam, number>[] {
  const { times: t, signal: y } = req
  const n = t.length
  const dt = median(t.slice(1).map((v, i) => v - t[i]!))
  const tail = y.slice(-Math.max(3, Math.floor(n / 20)))
  const offset = median(tail)
  let peak = 0
  for (let i = 1; i < n; i++) if (Math.abs(y[i]! - offset) > Math.abs(y[peak]! - offset)) peak = i
  const amp = y[peak]! - offset
  let half = peak
  while (half > 0 && Math.abs(y[half - 1]! - offset) >= Math.abs(amp) / 2) half--
  let e = peak
  while (e < n - 1 && Math.abs(y[e]! - offset) > Math.abs(amp) / Math.E) e++
  const tauE = Math.max(2 * dt, e > peak ? t[e]! - t[peak]! : (t[n - 1]! - t[0]!) / 2)
  let t0 = irf === 'none' ? 0 : t[half]!
  if (irf === 'measured' && hist) {
    // the response's own half-rise time, measured from its time zero
    let acc = 0
    let k = 0
    while (k < hist.w.length - 1 && (acc += hist.w[k]!) < 0.1) k++
    t0 = t[half]! - (hist.b[k]! + hist.e[k]!) / 2
  }
  const fwhm = Math.max(2 * dt, 2 * (t[peak]! - t[half]!))
  const base = { offset, t0, irfFwhm: fwhm, a1: amp, tau1: tauE, a2: 0, tau2: tauE }
  if (req.model === 'mono') return [base]
  return [
    [0.3, 3, 0.5],
    [0.1, 1.5, 0.5],
    [0.5, 10, 0.7]
  ].map(([f1, f2, share]) => ({
    ...base,
    tau1: tauE * f1!,
    tau2: tauE * f2!,
    a1: amp * share!,
    a2: amp * (1 - share!)
  }))
}

/** Fits a decay trace; throws PhysicsInputError (every problem named) on bad input. */
export function fitDecay (req: DecayFitRequest): DecayFitResult {
  const { irf, weighting } = checkDecayRequest(req)
  const { times: t, signal: y } = req
  const n = t.length
  const hist = req.irf?.kind === 'measured' ? irfHistogram(req.irf.times, req.irf.signal) : undefined
  const names = parameterNames(req.model, irf)
  const fixed: Partial<Record<DecayParam, number>> = { ...(irf === 'none' ? { t0: 0 } : {}), ...req.fixed }
  if (req.irf?.kind === 'gaussian' && req.irf.fwhm !== undefined) fixed.irfFwhm = req.irf.fwhm
  const free = names.filter(k => fixed[k] === undefined)
  const span = t[n - 1]! - t[0]!
  const dt = median(t.slice(1).map((v, i) => v - t[i]!))
  const yMax = Math.max(...y.map(Math.abs))
  const defaults: Record<DecayParam, [number, number]> = {
    a1: [-1e3 * yMax, 1e3 * yMax],
    a2: [-1e3 * yMax, 1e3 * yMax],
    offset: [-10 * yMax, 10 * yMax],
    tau1: [dt / 100, 100 * span],
    tau2: [dt / 100, 100 * span],
    t0: [t[0]! - span, t[n - 1]!],
    irfFwhm: [dt / 10, span / 2]
  }
  const box = free.map(k => req.bounds?.[k] ?? defaults[k])
  const lo = box.map(b => b[0])
  const hi = box.map(b => b[1])
  const floors = free.map(k => (k.startsWith('a') || k === 'offset' ? yMax : dt))
  const w = new Float64Array(n)
  for (let i = 0; i < n; i++)
    w[i] = weighting === 'poisson' ? 1 / Math.sqrt(Math.max(y[i]!, 1)) : weighting === 'given' ? 1 / req.sigma![i]! : 1
  const all = [...Array(n).keys()]
  const full = problemOf(req, irf, names, free, fixed, all, w, lo, hi, floors, hist)
  const clamp = (g: Record<DecayParam, number>) =>
    free.map((k, j) => Math.min(Math.max(req.initial?.[k] ?? g[k], lo[j]!), hi[j]!))
  const starts = guess(req, irf, hist).map(clamp)
  let best: Run
  let iterations = 0
  if (starts.length > 1 || n > THIN_TO) {
    const stride = Math.max(1, Math.ceil(n / THIN_TO))
    const sub
      = stride > 1
        ? problemOf(
            req,
            irf,
            names,
            free,
            fixed,
            all.filter(i => i % stride === 0),
            w,
            lo,
            hi,
            floors,
            hist
          )
        : full
    const runs = starts.map(s => lmRun(sub, s))
    iterations += runs.reduce((s, r) => s + r.iterations, 0)
    const first = runs.reduce((a, b) => (b.chi < a.chi ? b : a))
    best = sub === full ? first : lmRun(full, first.vec)
    if (sub !== full) iterations += best.iterations
  }
  else {
    best = lmRun(full, starts[0]!)
    iterations += best.iterations
  }
  const vec = best.vec
  vec.forEach((v, j) => {
    if (best.active[j]) vec[j] = Math.abs(v - lo[j]!) <= Math.abs(v - hi[j]!) ? lo[j]! : hi[j]!
  })
  const atBound = free.filter((_, j) => best.active[j])
  const status: FitStatus = best.status === 'stalled' ? 'stalled' : atBound.length ? 'at-bound' : 'converged'
  const f = new Float64Array(n)
  full.evaluate(vec, f)
  const dof = n - free.length
  const chiRed = dof > 0 ? best.chi / dof : null
  const scaled = weighting === 'none'
  const scale = scaled ? (chiRed ?? NaN) : 1
  const { cov } = covariance(full, vec, best.active)
  const parameters: DecayFitResult['parameters'] = {}
  for (const k of names) {
    const j = free.indexOf(k)
    if (j < 0) parameters[k] = { value: fixed[k]!, stderr: 0, fixed: true }
    else {
      const v = cov?.[j]
      const se = v !== undefined && Number.isFinite(v) ? Math.sqrt(v * scale) : null
      parameters[k] = {
        value: vec[j]!,
        stderr: se !== null && Number.isFinite(se) ? se : null,
        fixed: false,
        ...(best.active[j] ? { atBound: vec[j] === lo[j] ? ('lower' as const) : ('upper' as const) } : {})
      }
    }
  }
  // τ₁ < τ₂: swap the components (with their errors) when the fit found them the other way round
  if (req.model === 'bi' && parameters.tau1!.value > parameters.tau2!.value) {
    ;[parameters.tau1, parameters.tau2] = [parameters.tau2!, parameters.tau1!]
    ;[parameters.a1, parameters.a2] = [parameters.a2!, parameters.a1!]
  }
  const seconds = TIME_UNITS[req.timeUnit]
  const comps = (req.model === 'bi' ? (['1', '2'] as const) : (['1'] as const)).map(i => ({
    name: `tau${i}` as const,
    tau: parameters[`tau${i}`]!,
    a: parameters[`a${i}`]!
  }))
  const area = comps.reduce((s, c) => s + Math.abs(c.a.value) * c.tau.value, 0)
  const lifetimes: DecayLifetime[] = comps.map(c => ({
    name: c.name,
    value: c.tau.value,
    stderr: c.tau.stderr,
    amplitude: c.a.value,
    areaFraction: area > 0 ? (Math.abs(c.a.value) * c.tau.value) / area : NaN,
    rate: {
      value: 1 / (c.tau.value * seconds),
      stderr: c.tau.stderr === null ? null : c.tau.stderr / (c.tau.value * c.tau.value * seconds)
    }
  }))
  const residuals = y.map((v, i) => v - f[i]!)
  return {
    model: req.model,
    irf,
    weighting,
    timeUnit: req.timeUnit,
    parameters,
    lifetimes,
    chiSquared: best.chi,
    chiSquaredReduced: chiRed,
    degreesOfFreedom: dof,
    uncertaintyKind: scaled ? 'scaled' : 'absolute',
    status,
    atBound,
    iterations,
    fitted: Array.from(f),
    residuals,
    warnings: decayWarnings({ req, irf, parameters, lifetimes, chiRed, weighting, dt, span, status, atBound })
  }
}

/** What could mislead in a fit: lifetimes the trace cannot resolve, a poor χ², large errors, a stopped optimizer. */
function decayWarnings (x: {
  req: DecayFitRequest
  irf: DecayFitResult['irf']
  parameters: DecayFitResult['parameters']
  lifetimes: DecayLifetime[]
  chiRed: number | null
  weighting: string
  dt: number
  span: number
  status: FitStatus
  atBound: DecayParam[]
}): string[] {
  const out: string[] = []
  const u = x.req.timeUnit
  if (x.status === 'stalled')
    out.push(
      'The optimizer stopped without confirming a minimum: the values are the best found, not a result. '
      + 'Give starting values or fix a parameter.'
    )
  if (x.atBound.length) out.push(`At the edge of the allowed range: ${x.atBound.map(k => PARAMETER_WORDS[k]).join(', ')}.`)
  const width = x.parameters.irfFwhm?.value
  for (const l of x.lifetimes) {
    const name = PARAMETER_WORDS[l.name]
    if (l.value < 2 * x.dt && x.irf === 'none')
      out.push(`${name} = ${l.value.toPrecision(3)} ${u} is shorter than two time steps: not resolved.`)
    if (width !== undefined && l.value < width / 2)
      out.push(
        `${name} = ${l.value.toPrecision(3)} ${u} is shorter than half the response width (${width.toPrecision(3)} ${u}): `
        + 'it rests on the response model.'
      )
    if (l.value > x.span / 3)
      out.push(`${name} = ${l.value.toPrecision(3)} ${u} is longer than a third of the window: record longer.`)
    if (l.stderr !== null && l.stderr > 0.2 * l.value) out.push(`${name} is uncertain by more than 20 %.`)
    if (l.stderr === null) out.push(`${name} has no standard error: the trace does not constrain it.`)
  }
  if (x.weighting !== 'none' && x.chiRed !== null && x.chiRed > 2)
    out.push(
      `χ²_red = ${x.chiRed.toFixed(2)}: the model does not describe the trace within its errors (another component, `
      + 'a wrong response, or errors too small).'
    )
  return out
}
