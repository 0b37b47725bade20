/** Rates from what labs measure: lifetimes, Stern–Volmer quenching, the diffusion limit. Times in s. */
import { GAS_CONSTANT_J_PER_MOL_K } from './constants'
import { IssueCollector } from './errors'

/** k_ET = 1/τ − 1/τ_ref from the donor lifetime with (τ) and without (τ_ref) the acceptor, s⁻¹. */
export function rateFromLifetimes (tau: number, tauReference: number): number {
  const c = new IssueCollector()
  c.positive(tau, '/lifetime', 'Lifetime τ')
  c.positive(tauReference, '/referenceLifetime', 'Reference lifetime τ_ref')
  c.throwIfAny()
  if (tau >= tauReference) {
    c.add(
      '/lifetime',
      'The lifetime with the acceptor must be shorter than the reference lifetime; no electron-transfer rate can be derived'
    )
    c.throwIfAny()
  }
  return 1 / tau - 1 / tauReference
}

export const LIFETIME_FORMULA = 'k_ET = 1/τ − 1/τ_ref'

/** Electron-transfer quantum yield Φ = k_ET · τ. */
export function transferYield (rate: number, tau: number): number {
  return rate * tau
}

/**
 * Diffusion-limited bimolecular rate constant k_diff = 8RT/(3η) (Smoluchowski–Stokes–Einstein),
 * in M⁻¹ s⁻¹, for a viscosity in Pa s.
 */
export function diffusionLimit (viscosityPaS: number, temperatureK: number): number {
  const c = new IssueCollector()
  c.positive(viscosityPaS, '/viscosity', 'Viscosity')
  c.positive(temperatureK, '/temperatureK', 'Temperature')
  c.throwIfAny()
  // m³ mol⁻¹ s⁻¹ → L mol⁻¹ s⁻¹
  return ((8 * GAS_CONSTANT_J_PER_MOL_K * temperatureK) / (3 * viscosityPaS)) * 1000
}

export interface SternVolmerPoint {
  quencherConcentration: number
  intensityRatio: number
}
export interface SternVolmerResult {
  /** K_SV (M⁻¹): slope of τ₀/τ (or I₀/I) − 1 against [Q], through the origin. */
  sternVolmerConstant: number
  /** k_q = K_SV / τ₀, M⁻¹ s⁻¹. */
  quenchingRate: number
  /** k_q relative to the diffusion limit, when a viscosity was given. */
  fractionOfDiffusionLimit?: number
  /** True when k_q is at least half the diffusion limit: the rate then says little about the ET step. */
  nearDiffusionLimit?: boolean
}

/**
 * Stern–Volmer analysis, τ₀/τ = 1 + k_q τ₀ [Q]: least-squares slope through the origin.
 * Written here (three sums) rather than pulled from a regression package because the
 * line is forced through (0, 1).
 */
export function sternVolmer (
  points: SternVolmerPoint[],
  tau0: number,
  opts: { viscosityPaS?: number, temperatureK?: number } = {}
): SternVolmerResult {
  const c = new IssueCollector()
  c.positive(tau0, '/tau0', 'Unquenched lifetime τ₀')
  if (points.length < 1) c.add('/points', 'At least one quencher concentration is needed')
  points.forEach((p, i) => {
    c.nonNegative(p.quencherConcentration, `/points/${i}/quencherConcentration`, 'Quencher concentration')
    c.positive(p.intensityRatio, `/points/${i}/intensityRatio`, 'τ₀/τ ratio')
  })
  c.throwIfAny()
  let sxy = 0
  let sxx = 0
  for (const p of points) {
    sxy += p.quencherConcentration * (p.intensityRatio - 1)
    sxx += p.quencherConcentration ** 2
  }
  if (sxx === 0) {
    c.add('/points', 'All quencher concentrations are zero')
    c.throwIfAny()
  }
  const ksv = sxy / sxx
  const kq = ksv / tau0
  const res: SternVolmerResult = { sternVolmerConstant: ksv, quenchingRate: kq }
  if (opts.viscosityPaS !== undefined) {
    const kd = diffusionLimit(opts.viscosityPaS, opts.temperatureK ?? 298.15)
    res.fractionOfDiffusionLimit = kq / kd
    res.nearDiffusionLimit = kq >= 0.5 * kd // common practice: within a factor of two of k_diff
  }
  return res
}
