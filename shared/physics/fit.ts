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
import { IssueCollector } from './errors'
import { checkHuangRhys } from './bounds'
import { covariance, lmRun, type Run } from './fit-lm'
import { asLsq, assemble, chiSquared, model, prepare, profileCoupling, type Group, type Problem } from './fit-problem'
import {
  DEFAULT_INITIAL,
  MODEL_PARAMETERS,
  PARAMETER_LABELS,
  type FitRequest,
  type FitResult,
  type FitStatus,
  type ParameterName
} from './fit-types'

export * from './fit-types'

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
  for (const g of prob.groups)
    g.idx.forEach((i, j) => {
      x[i] = g.x[j]!
    })
  order.sort((a, b) => x[a]! - x[b]!)
  const pick: number[] = []
  for (let t = 0; t < SCAN_POINTS; t++) pick.push(order[Math.floor((t * prob.n) / SCAN_POINTS)]!)
  const y = Float64Array.from(pick, i => prob.y[i]!)
  const w = Float64Array.from(pick, i => prob.w[i]!)
  const Ts = new Map<number, number[]>()
  const Tof = new Float64Array(prob.n)
  for (const g of prob.groups) for (const i of g.idx) Tof[i] = g.T
  pick.forEach((i, j) => {
    const l = Ts.get(Tof[i]!)
    if (l) l.push(j)
    else Ts.set(Tof[i]!, [j])
  })
  const groups: Group[] = [...Ts].map(([T, list]) => ({
    T,
    idx: Int32Array.from(list),
    x: Float64Array.from(list, j => x[pick[j]!]!),
    out: new Float64Array(list.length)
  }))
  return { ...prob, n: pick.length, y, w, groups }
}

/** Starting vectors: the caller's, then the best distinct points of the scan. */
function starts (prob: Problem, first: number[], count: number): number[][] {
  const f = new Float64Array(prob.n)
  const axes = prob.free.map((k, j) =>
    k === 'coupling' ? [first[j]!] : SCAN[k].filter(v => v >= prob.lo[j]! && v <= prob.hi[j]!)
  )
  const scored: { vec: number[], chi: number }[] = []
  const rec = (j: number, cur: number[]) => {
    if (j === axes.length) {
      const v = cur.slice()
      model(prob, v, f)
      profileCoupling(prob, v, f)
      model(prob, v, f)
      const chi = chiSquared(prob, f)
      if (Number.isFinite(chi)) scored.push({ vec: v, chi })
      return
    }
    for (const a of axes[j]!) {
      cur[j] = a
      rec(j + 1, cur)
    }
  }
  rec(0, first.slice())
  scored.sort((a, b) => a.chi - b.chi)
  const out = [first]
  for (const s of scored) {
    if (out.length > count) break
    // distinct: differ from every chosen start by more than a fifth of the range in some parameter
    if (
      out.every(o =>
        o.some(
          (v, j) =>
            Math.abs(v - s.vec[j]!) > 0.2 * (prob.hi[j]! - prob.lo[j]!)
            || (prob.free[j] !== 'coupling' && Math.abs(v - s.vec[j]!) > 0.5 * Math.max(v, s.vec[j]!))
        )
      )
    )
      out.push(s.vec)
  }
  return out
}

/** Fit the model to the points. Throws PhysicsInputError for bad or under-determined requests. */
export function fitRates (req: FitRequest): FitResult {
  const { prob, Tmin, Tmax } = prepare(req)
  const n = prob.n
  const k = prob.free.length
  const start = { ...DEFAULT_INITIAL, ...(req.initial ?? {}), ...prob.fixed } as Record<ParameterName, number>
  if (
    req.model === 'semiclassical'
    && req.initial
    && (req.initial.lambdaInternal !== undefined || req.initial.vibrationEnergy !== undefined)
  ) {
    const c = new IssueCollector()
    checkHuangRhys(c, start.lambdaInternal, start.vibrationEnergy, '/initial/lambdaInternal')
    c.throwIfAny()
  }
  const first = prob.free.map((name, j) => {
    const v = name === 'coupling' ? Math.log10(start.coupling) : start[name]
    return Math.min(Math.max(v, prob.lo[j]!), prob.hi[j]!)
  })
  const f = new Float64Array(n)
  if (req.initial?.coupling === undefined) {
    model(prob, first, f)
    profileCoupling(prob, first, f)
  }

  // The scan and the first runs use at most SCAN_POINTS points; the best runs are then finished on all of them.
  const sub = subProblem(prob)
  const runs = starts(sub, first, 3).map(s => lmRun(asLsq(sub), s))
  let iterations = runs.reduce((s, r) => s + r.iterations, 0)
  let startCount = runs.length
  let best: Run
  if (sub === prob) {
    best = runs.reduce((a, b) => (b.chi < a.chi ? b : a))
  }
  else {
    const order = runs.slice().sort((a, b) => a.chi - b.chi)
    const finals = order.slice(0, 2).map(r => lmRun(asLsq(prob), r.vec))
    iterations += finals.reduce((s, r) => s + r.iterations, 0)
    best = finals.reduce((a, b) => (b.chi < a.chi ? b : a))
    // a stalled finish gets one more try from the caller's own start on all the points
    if (best.status === 'stalled') {
      const again = lmRun(asLsq(prob), first)
      iterations += again.iterations
      startCount++
      if (again.chi < best.chi || (again.status === 'converged' && again.chi <= best.chi * (1 + 1e-9))) best = again
    }
  }
  // Prefer a converged run when a stalled one is better only by rounding.
  const conv = runs.filter(r => r.status === 'converged' && r.chi <= best.chi * (1 + 1e-9))
  if (best.status === 'stalled' && conv.length && sub === prob) best = conv[0]!
  const vec = best.vec
  const chi = best.chi
  // a parameter held at a bound sits on it (within rounding): report the bound itself
  vec.forEach((v, j) => {
    if (best.active[j]) vec[j] = Math.abs(v - prob.lo[j]!) <= Math.abs(v - prob.hi[j]!) ? prob.lo[j]! : prob.hi[j]!
  })
  const atBound = prob.free.filter((_, j) => best.active[j])
  const status: FitStatus = best.status === 'stalled' ? 'stalled' : atBound.length ? 'at-bound' : 'converged'

  const dof = n - k
  const chiRed = dof > 0 ? chi / dof : null
  const warnings: string[] = []
  const scale = prob.hasSigma ? 1 : (chiRed ?? NaN)
  if (!prob.hasSigma && dof === 0)
    warnings.push(
      'No degrees of freedom are left (as many points as free parameters): standard errors cannot be estimated.'
    )
  if (status === 'stalled')
    warnings.push(
      `The optimizer stopped without confirming a minimum after ${iterations} iterations from ${startCount} starting `
      + `points: the values below are the best found, not a fit result. Fix a parameter, give starting values or add `
      + `points.`
    )
  const { cov, noEffect } = covariance(asLsq(prob), vec, best.active)
  const p = assemble(prob, vec)
  const parameters: FitResult['parameters'] = {}
  const bounds: FitResult['bounds'] = {}
  for (const name of MODEL_PARAMETERS[req.model] as readonly ParameterName[]) {
    const fi = prob.free.indexOf(name)
    if (fi < 0) {
      parameters[name] = {
        value: prob.fixed[name]!,
        stderr: 0,
        fixed: true,
        ...(name === 'coupling' ? { log10Stderr: 0 } : {})
      }
      continue
    }
    bounds[name] = name === 'coupling' ? [10 ** prob.lo[fi]!, 10 ** prob.hi[fi]!] : [prob.lo[fi]!, prob.hi[fi]!]
    const variance = cov ? cov[fi]! * scale : NaN
    const se = !best.active[fi] && Number.isFinite(variance) && variance >= 0 ? Math.sqrt(variance) : null
    const value = p[name]
    const edge = best.active[fi] ? (vec[fi]! <= prob.lo[fi]! ? 'lower' : 'upper') : undefined
    if (name === 'coupling')
      parameters[name] = { value, stderr: se === null ? null : value * Math.LN10 * se, log10Stderr: se, fixed: false }
    else parameters[name] = { value, stderr: se, fixed: false }
    if (edge) parameters[name]!.atBound = edge
    const label = PARAMETER_LABELS[name]
    if (edge) {
      const bv = bounds[name]![edge === 'lower' ? 0 : 1]
      warnings.push(
        `${cap(label)} ended at the ${edge} bound of its allowed range (${bv} eV): the best fit wants it `
        + `${edge === 'lower' ? 'lower' : 'higher'}; its standard error is not given and the others' come from the `
        + `fit with it held there.`
      )
    }
    else if (noEffect[fi]) {
      warnings.push(
        name === 'vibrationEnergy' && p.lambdaInternal === 0
          ? 'The mode energy ħω has no effect while λ_i = 0 (the classical limit): it is not determined; fix it.'
          : `The data do not depend on ${label} here: it is not determined; fix it.`
      )
    }
    else if (se === null && dof > 0)
      warnings.push(`The data cannot constrain ${label}: fix it or add points that span more driving force.`)
    // common practice: call a parameter poorly determined past 50 % relative error (a factor of 2 for V)
    else if (se !== null && name !== 'coupling' && se > 0.5 * Math.abs(value))
      warnings.push(`${cap(label)} is poorly determined: its standard error is more than half its value.`)
    else if (se !== null && name === 'coupling' && se > Math.log10(2))
      warnings.push('The coupling is poorly determined: its standard error spans more than a factor of two.')
  }
  if (chiRed !== null && prob.hasSigma && chiRed > 4)
    warnings.push(`χ²_red = ${chiRed.toFixed(2)}: the model does not describe these points within their uncertainties.`)
  model(prob, vec, f)
  const residuals = Array.from(f, (v, i) => prob.y[i]! - v)
  return {
    model: req.model,
    temperatureK: req.temperatureK ?? (Tmin === Tmax ? Tmin : null),
    temperatureRangeK: [Tmin, Tmax],
    parameters,
    chiSquared: chi,
    chiSquaredReduced: chiRed,
    degreesOfFreedom: dof,
    residuals,
    uncertaintyKind: prob.hasSigma ? 'absolute' : 'scaled',
    status,
    atBound,
    converged: status !== 'stalled',
    iterations,
    starts: startCount,
    bounds,
    warnings
  }
}

function cap (s: string): string {
  return s.charAt(0).toUpperCase() + s.slice(1)
}
