/**
 * Non-adiabatic electron-transfer rate expressions (golden-rule regime):
 * classical Marcus and semi-classical Marcus–Levich–Jortner (one quantum mode, classical solvent).
 *
 * Everything is evaluated in log space: log10 k stays finite deep in the inverted region and at
 * low temperature, where k itself underflows a double. Energies in eV, temperature in K, rates in s⁻¹.
 */
import { BOLTZMANN_EV_PER_K, HBAR_EV_S, LN10 } from './constants'
import { IssueCollector } from './errors'
import { checkBound, checkHuangRhys, MAX_HUANG_RHYS, MODEL_BOUNDS } from './bounds'
import { budgetExceeded, tablesFor, vibronicRun, type VibronicState } from './vibronic-sum'

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

/** ln of the golden-rule prefactor (2π/ħ) V² (4πλk_BT)^(-1/2), in ln(s⁻¹). */
function lnPrefactor (coupling: number, lambda: number, kT: number): number {
  return Math.log((2 * Math.PI) / HBAR_EV_S) + 2 * Math.log(coupling) - 0.5 * Math.log(4 * Math.PI * lambda * kT)
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

/** Evaluates log10 k of one expression at one driving force at a time, with tables kept between calls. */
export interface RateEvaluator {
  log10Rate(deltaG: number): number
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
      return (lnA - (x * x) / a) / LN10
    },
    termsUsed: 1
  }
}

/** A semi-classical (Marcus–Levich–Jortner) evaluator (no checks: call {@link checkSemiclassical} first). */
export function createSemiclassicalEvaluator (
  p: SemiclassicalParams
): RateEvaluator & { run(dg: ArrayLike<number>, out: Float64Array): void } {
  if (p.lambdaInternal === 0) {
    const c = createClassicalEvaluator({
      lambdaTotal: p.lambdaSolvent,
      coupling: p.coupling,
      temperatureK: p.temperatureK
    })
    return {
      ...c,
      run (dg, out) {
        for (let i = 0; i < dg.length; i++) out[i] = c.log10Rate(dg[i]!)
      }
    }
  }
  const kT = BOLTZMANN_EV_PER_K * p.temperatureK
  const h = p.vibrationEnergy
  const S = p.lambdaInternal / h
  // Callers check the bounds (S ≤ 200); this guard keeps an unchecked caller from building huge tables.
  if (!(S <= 5 * MAX_HUANG_RHYS)) budgetExceeded(`a Huang–Rhys factor of ${S.toPrecision(3)}`)
  const a = 4 * p.lambdaSolvent * kT
  const c3 = (-2 * h * h) / a
  const st: VibronicState = {
    ls: p.lambdaSolvent,
    h,
    a,
    lnA: lnPrefactor(p.coupling, p.lambdaSolvent, kT),
    c1: Math.log(S) - (h * h) / a,
    c2: (-2 * h) / a,
    c3,
    q: Math.exp(c3),
    tables: tablesFor(S),
    jStar: 0,
    termsUsed: 1
  }
  const one = new Float64Array(1)
  const single = [0]
  return {
    get termsUsed () {
      return st.termsUsed
    },
    log10Rate (deltaG: number): number {
      single[0] = deltaG
      vibronicRun(single, one, st)
      return one[0]!
    },
    run (dg: ArrayLike<number>, out: Float64Array): void {
      vibronicRun(dg, out, st)
    }
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
export function semiclassicalTerms (
  drivingForces: ArrayLike<number>,
  p: SemiclassicalParams,
  opts: { minWeight?: number, maxTerms?: number } = {}
): TermContribution[] {
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
      log10Rate[i] = (lnA + lnW - (y * y) / a) / LN10
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
