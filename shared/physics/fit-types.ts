/** The fit's public shapes: request, point, parameters, result and status, with the names the public API binds. */
export type ModelName = 'classical' | 'semiclassical'
export const MODEL_PARAMETERS = {
  classical: ['lambdaTotal', 'coupling'],
  semiclassical: ['lambdaSolvent', 'lambdaInternal', 'vibrationEnergy', 'coupling']
} as const
export type ParameterName = 'lambdaTotal' | 'lambdaSolvent' | 'lambdaInternal' | 'vibrationEnergy' | 'coupling'

/** Defaults for starting values (eV); the coupling's start is scaled to the data instead. */
export const DEFAULT_INITIAL: Record<ParameterName, number> = {
  lambdaTotal: 0.8,
  lambdaSolvent: 0.6,
  lambdaInternal: 0.3,
  vibrationEnergy: 0.18,
  coupling: 0.001
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
