/**
 * Non-adiabatic electron-transfer rate expressions (golden-rule regime):
 * classical Marcus and semi-classical Marcus–Levich–Jortner (one quantum mode, classical solvent).
 *
 * Everything is evaluated in log space: log10 k stays finite deep in the inverted region and at
 * low temperature, where k itself underflows a double. Energies in eV, temperature in K, rates in s⁻¹.
 */
import { BOLTZMANN_EV_PER_K, HBAR_EV_S, LN10 } from './constants'
import { IssueCollector, PhysicsInputError } from './errors'
import { checkBound, checkHuangRhys, MAX_HUANG_RHYS, MODEL_BOUNDS, MAX_VIBRONIC_INDEX, MAX_VIBRONIC_TERMS } from './bounds'

/** Parameters of the classical Marcus expression. */
export interface ClassicalParams {
  /** Total reorganization energy λ, eV (> 0). */
  lambdaTotal: number
  /** Electronic coupling V, eV (> 0). */
  coupling: number
  /** Temperature, K (> 0). */
  temperatureK: number
}

/** Parameters of the semi-classical (Marcus–Levich–Jortner) expression. */
export interface SemiclassicalParams {
  /** Solvent (outer-sphere) reorganization energy λ_s, eV (> 0). */
  lambdaSolvent: number
  /** Internal (inner-sphere) reorganization energy λ_i, eV (≥ 0; 0 gives classical Marcus with λ = λ_s). */
  lambdaInternal: number
  /** Energy ħω of the effective quantum mode, eV (> 0). */
  vibrationEnergy: number
  /** Electronic coupling V, eV (> 0). */
  coupling: number
  /** Temperature, K (> 0). */
  temperatureK: number
}

export interface CurveResult {
  log10Rate: Float64Array
  /** Largest number of vibronic terms summed for any point (1 for the classical expression). */
  termsUsed: number
}

/** Relative size below which the rest of the vibronic sum cannot change a double. */
const TAIL_EPSILON = 2 ** -54

export function checkClassical (p: ClassicalParams, base = ''): void {
  const c = new IssueCollector()
  checkBound(c, p.lambdaTotal, 'lambdaTotal', `${base}/lambdaTotal`)
  checkBound(c, p.coupling, 'coupling', `${base}/coupling`)
  checkBound(c, p.temperatureK, 'temperatureK', `${base}/temperatureK`)
  c.throwIfAny()
}

export function checkSemiclassical (p: SemiclassicalParams, base = ''): void {
  const c = new IssueCollector()
  checkBound(c, p.lambdaSolvent, 'lambdaSolvent', `${base}/lambdaSolvent`)
  const li = checkBound(c, p.lambdaInternal, 'lambdaInternal', `${base}/lambdaInternal`)
  const hw = checkBound(c, p.vibrationEnergy, 'vibrationEnergy', `${base}/vibrationEnergy`)
  checkBound(c, p.coupling, 'coupling', `${base}/coupling`)
  checkBound(c, p.temperatureK, 'temperatureK', `${base}/temperatureK`)
  if (li && hw) checkHuangRhys(c, p.lambdaInternal, p.vibrationEnergy, `${base}/lambdaInternal`)
  c.throwIfAny()
}

export function checkDrivingForces (dg: ArrayLike<number>, base = '/drivingForces'): void {
  const c = new IssueCollector()
  const { min, max } = MODEL_BOUNDS.drivingForce
  for (let i = 0; i < dg.length && c.issues.length < 20; i++) {
    const v = dg[i]!
    if (!(v >= min && v <= max)) checkBound(c, v, 'drivingForce', `${base}/${i}`) // the path is built only for a bad value
  }
  c.throwIfAny()
}

function budgetExceeded (what: string): never {
  throw new PhysicsInputError([{ path: '/', message: `The vibronic sum would need ${what}; the inputs are outside what the model can evaluate` }])
}

/** ln of the golden-rule prefactor (2π/ħ) V² (4πλk_BT)^(-1/2), in ln(s⁻¹). */
function lnPrefactor (coupling: number, lambda: number, kT: number): number {
  return Math.log(2 * Math.PI / HBAR_EV_S) + 2 * Math.log(coupling) - 0.5 * Math.log(4 * Math.PI * lambda * kT)
}

/** Classical activation free energy ΔG‡ = (λ + ΔG°)² / (4λ), eV. */
export function activationFreeEnergy (deltaG: number, lambda: number): number {
  return (lambda + deltaG) ** 2 / (4 * lambda)
}

/** Classical Marcus log10 k for each driving force ΔG° (eV, negative = downhill). */
export function classicalLog10Rates (drivingForces: ArrayLike<number>, p: ClassicalParams): CurveResult {
  checkClassical(p)
  checkDrivingForces(drivingForces)
  return evaluateAll(drivingForces, createClassicalEvaluator(p))
}

/** Cached per-parameter tables for the vibronic sum (ln Poisson weights, ln(j+1), ratio factors). */
class VibronicTables {
  lnWeight = new Float64Array(0)
  lnJ1 = new Float64Array(0)
  /** (j+1)/(j+2): how the up-ratio changes from step j to j+1, apart from the Gaussian factor q. */
  upStep = new Float64Array(0)
  constructor (readonly S: number) { this.grow(Math.ceil(S + 12 * Math.sqrt(S)) + 24) }
  grow (n: number): void {
    const lnS = Math.log(this.S)
    const lw = new Float64Array(n); const l1 = new Float64Array(n); const us = new Float64Array(n)
    let lnFact = 0
    for (let j = 0; j < n; j++) {
      if (j > 0) lnFact += Math.log(j)
      lw[j] = -this.S + j * lnS - lnFact
      l1[j] = Math.log(j + 1)
      us[j] = (j + 1) / (j + 2)
    }
    this.lnWeight = lw; this.lnJ1 = l1; this.upStep = us
  }

  ensure (j: number): void {
    if (j + 2 >= this.lnWeight.length) this.grow(Math.max(2 * this.lnWeight.length, j + 64))
  }
}

/** Evaluates log10 k of one expression at one driving force at a time, with tables kept between calls. */
export interface RateEvaluator {
  log10Rate (deltaG: number): number
  /** Largest number of terms summed by any call so far. */
  readonly termsUsed: number
}

/** A classical Marcus evaluator (no checks: call {@link checkClassical} first). */
export function createClassicalEvaluator (p: ClassicalParams): RateEvaluator {
  const kT = BOLTZMANN_EV_PER_K * p.temperatureK
  const a = 4 * p.lambdaTotal * kT
  const lnA = lnPrefactor(p.coupling, p.lambdaTotal, kT)
  const lambda = p.lambdaTotal
  return {
    log10Rate (deltaG: number): number {
      const x = deltaG + lambda
      return (lnA - x * x / a) / LN10
    },
    termsUsed: 1
  }
}

/**
 * Tables depend only on S; fits with λ_i and ħω fixed ask for the same S thousands of times,
 * so the last few are kept (a small cache, not shared state: the tables only ever grow).
 */
const tableCache: VibronicTables[] = []
function tablesFor (S: number): VibronicTables {
  for (const t of tableCache) if (t.S === S) return t
  const t = new VibronicTables(S)
  tableCache.unshift(t)
  if (tableCache.length > 4) tableCache.pop()
  return t
}

/** Constants and tables of one semi-classical parameter set, shared by every call. */
interface VibronicState {
  ls: number, h: number, a: number, lnA: number
  c1: number, c2: number, c3: number, q: number
  tables: VibronicTables
  /** Index of the largest term at the previous point: the warm start for the next. */
  jStar: number
  termsUsed: number
}

/**
 * The vibronic sum for a run of driving forces, written into `out` as log10 k.
 *
 * The terms T_j = w_j exp[−(ΔG° + λ_s + jħω)²/(4λ_s k_BT)] with Poisson weights
 * w_j = e^(−S) S^j / j! are log-concave in j, so the sum is taken outward from its largest term
 * with multiplicative recurrences (no exp per term), and each direction stops as soon as the
 * geometric bound on the remaining tail falls below 2⁻⁵⁴ of the running sum (under half an ulp,
 * so it cannot change the double) — never a fixed cut-off. The largest term's index is searched
 * from the previous point's, which makes sorted inputs O(1) per point. State lives in locals
 * here (not in a closure) because that keeps V8's hot loop in registers.
 */
function vibronicRun (dg: ArrayLike<number>, out: Float64Array, st: VibronicState): void {
  const { ls, h, a, lnA, c1, c2, c3, q, tables } = st
  let lw = tables.lnWeight
  let l1 = tables.lnJ1
  let us = tables.upStep
  let cap = lw.length - 2
  let jStar = st.jStar
  let termsUsed = st.termsUsed
  const n = dg.length
  for (let i = 0; i < n; i++) {
    const x = dg[i]! + ls
    // ln(T_{j+1}/T_j) = base − ln(j+1) + c3·j, decreasing in j; the largest term is the first j where it is < 0.
    const base = c1 + c2 * x
    while (jStar > 0 && base - l1[jStar - 1]! + c3 * (jStar - 1) < 0) jStar--
    while (base - l1[jStar]! + c3 * jStar >= 0) {
      if (jStar >= MAX_VIBRONIC_INDEX) budgetExceeded(`a dominant term beyond j = ${MAX_VIBRONIC_INDEX}`)
      if (++jStar >= cap) { tables.ensure(jStar); lw = tables.lnWeight; l1 = tables.lnJ1; us = tables.upStep; cap = lw.length - 2 }
    }
    const y = x + jStar * h
    const lnMax = lw[jStar]! - y * y / a
    const rUp0 = Math.exp(base - l1[jStar]! + c3 * jStar)
    let sum = 1
    let used = 1
    // Upward: T_{j+1} = T_j · r_j, and r_{j+1} = r_j · q · (j+1)/(j+2).
    let t = 1
    let r = rUp0
    let j = jStar
    for (;;) {
      t *= r
      sum += t
      if (++used > MAX_VIBRONIC_TERMS) budgetExceeded(`more than ${MAX_VIBRONIC_TERMS} terms`)
      if (++j >= cap) { tables.ensure(j); lw = tables.lnWeight; l1 = tables.lnJ1; us = tables.upStep; cap = lw.length - 2 }
      r *= q * us[j - 1]!
      if (t * r < TAIL_EPSILON * (1 - r) * sum) break
    }
    // Downward: T_{j−1} = T_j · d_j with d_j = 1/r_{j−1} = q · j/(j+1) / r_j, and d_{j−1} = d_j · q · (j−1)/j.
    if (jStar > 0) {
      t = 1
      // d_{j*} from r_{j*} unless r_{j*} underflowed (then directly: one more exp, only in that corner).
      let d = rUp0 > 1e-290 ? q * us[jStar - 1]! / rUp0 : Math.exp(-(base - l1[jStar - 1]! + c3 * (jStar - 1)))
      j = jStar
      for (;;) {
        t *= d
        sum += t
        if (++used > MAX_VIBRONIC_TERMS) budgetExceeded(`more than ${MAX_VIBRONIC_TERMS} terms`)
        if (--j === 0) break
        d *= q * us[j - 1]!
        if (t * d < TAIL_EPSILON * (1 - d) * sum) break
      }
    }
    if (used > termsUsed) termsUsed = used
    out[i] = (lnA + lnMax + Math.log(sum)) / LN10
  }
  st.jStar = jStar
  st.termsUsed = termsUsed
}

/** A semi-classical (Marcus–Levich–Jortner) evaluator (no checks: call {@link checkSemiclassical} first). */
export function createSemiclassicalEvaluator (p: SemiclassicalParams): RateEvaluator & { run (dg: ArrayLike<number>, out: Float64Array): void } {
  if (p.lambdaInternal === 0) {
    const c = createClassicalEvaluator({ lambdaTotal: p.lambdaSolvent, coupling: p.coupling, temperatureK: p.temperatureK })
    return { ...c, run (dg, out) { for (let i = 0; i < dg.length; i++) out[i] = c.log10Rate(dg[i]!) } }
  }
  const kT = BOLTZMANN_EV_PER_K * p.temperatureK
  const h = p.vibrationEnergy
  const S = p.lambdaInternal / h
  // Callers check the bounds (S ≤ 200); this guard keeps an unchecked caller from building huge tables.
  if (!(S <= 5 * MAX_HUANG_RHYS)) budgetExceeded(`a Huang–Rhys factor of ${S.toPrecision(3)}`)
  const a = 4 * p.lambdaSolvent * kT
  const c3 = -2 * h * h / a
  const st: VibronicState = {
    ls: p.lambdaSolvent, h, a,
    lnA: lnPrefactor(p.coupling, p.lambdaSolvent, kT),
    c1: Math.log(S) - h * h / a,
    c2: -2 * h / a,
    c3,
    q: Math.exp(c3),
    tables: tablesFor(S),
    jStar: 0,
    termsUsed: 1
  }
  const one = new Float64Array(1)
  const single = [0]
  return {
    get termsUsed () { return st.termsUsed },
    log10Rate (deltaG: number): number {
      single[0] = deltaG
      vibronicRun(single, one, st)
      return one[0]!
    },
    run (dg: ArrayLike<number>, out: Float64Array): void { vibronicRun(dg, out, st) }
  }
}

function evaluateAll (drivingForces: ArrayLike<number>, ev: RateEvaluator): CurveResult {
  const n = drivingForces.length
  const out = new Float64Array(n)
  for (let i = 0; i < n; i++) out[i] = ev.log10Rate(drivingForces[i]!)
  return { log10Rate: out, termsUsed: ev.termsUsed }
}

/** Semi-classical (Marcus–Levich–Jortner) log10 k for each driving force ΔG° (eV, negative = downhill). */
export function semiclassicalLog10Rates (drivingForces: ArrayLike<number>, p: SemiclassicalParams): CurveResult {
  checkSemiclassical(p)
  checkDrivingForces(drivingForces)
  const ev = createSemiclassicalEvaluator(p)
  const out = new Float64Array(drivingForces.length)
  ev.run(drivingForces, out)
  return { log10Rate: out, termsUsed: ev.termsUsed }
}

/** Rates (s⁻¹) from log10 rates; 0 only where the rate underflows a double. */
export function ratesFromLog10 (log10Rate: ArrayLike<number>): Float64Array {
  const out = new Float64Array(log10Rate.length)
  for (let i = 0; i < out.length; i++) out[i] = 10 ** log10Rate[i]!
  return out
}

export interface TermContribution {
  /** Number of quanta j of the high-frequency mode excited in the product. */
  j: number
  /** Poisson (Franck–Condon) weight e^(−S) S^j / j!. */
  weight: number
  /** log10 of this term's contribution to the rate at each driving force. */
  log10Rate: Float64Array
}

/**
 * Per-term contributions of the semi-classical sum, for plotting the vibronic progression.
 * Returns the terms whose weight is at least `minWeight` (default 1e-6), up to `maxTerms`.
 */
export function semiclassicalTerms (drivingForces: ArrayLike<number>, p: SemiclassicalParams,
  opts: { minWeight?: number, maxTerms?: number } = {}): TermContribution[] {
  checkSemiclassical(p)
  checkDrivingForces(drivingForces)
  const minWeight = opts.minWeight ?? 1e-6
  const maxTerms = opts.maxTerms ?? 60
  const kT = BOLTZMANN_EV_PER_K * p.temperatureK
  const a = 4 * p.lambdaSolvent * kT
  const lnA = lnPrefactor(p.coupling, p.lambdaSolvent, kT)
  const S = p.lambdaInternal / p.vibrationEnergy
  const out: TermContribution[] = []
  let lnFact = 0
  for (let j = 0; j < 10000 && out.length < maxTerms; j++) {
    if (j > 0) lnFact += Math.log(j)
    const lnW = S === 0 ? (j === 0 ? 0 : -Infinity) : -S + j * Math.log(S) - lnFact
    const w = Math.exp(lnW)
    if (w < minWeight) {
      if (j > S) break
      continue
    }
    const log10Rate = new Float64Array(drivingForces.length)
    for (let i = 0; i < drivingForces.length; i++) {
      const y = drivingForces[i]! + p.lambdaSolvent + j * p.vibrationEnergy
      log10Rate[i] = (lnA + lnW - y * y / a) / LN10
    }
    out.push({ j, weight: w, log10Rate })
  }
  return out
}

/** Maximum of the classical curve, at ΔG° = −λ: (2π/ħ) V² (4πλk_BT)^(-1/2), s⁻¹. */
export function classicalPeakRate (p: ClassicalParams): number {
  checkClassical(p)
  return Math.exp(lnPrefactor(p.coupling, p.lambdaTotal, BOLTZMANN_EV_PER_K * p.temperatureK))
}
