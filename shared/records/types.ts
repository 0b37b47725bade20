/**
 * TypeScript view of schemas/rate-record.v1.json (canonical units). The JSON Schema is the
 * source of truth; keep the two in step (a unit test validates typed fixtures against it).
 */

export type Linkage = 'covalent' | 'supramolecular' | 'bimolecular' | 'protein' | 'other'
export type ProcessKind = 'charge-separation' | 'charge-recombination' | 'charge-shift' | 'hole-transfer' | 'other'
export type InitialState = 'singlet' | 'triplet' | 'thermal'
export type TechniqueMethod
  = | 'transient-absorption'
    | 'tcspc'
    | 'upconversion'
    | 'streak-camera'
    | 'pulse-radiolysis'
    | 'microwave-conductivity'
    | 'steady-state-quenching'
    | 'other'

export const LINKAGES: Linkage[] = ['covalent', 'supramolecular', 'bimolecular', 'protein', 'other']
export const PROCESSES: ProcessKind[] = [
  'charge-separation',
  'charge-recombination',
  'charge-shift',
  'hole-transfer',
  'other'
]
export const TECHNIQUES: TechniqueMethod[] = [
  'transient-absorption',
  'tcspc',
  'upconversion',
  'streak-camera',
  'pulse-radiolysis',
  'microwave-conductivity',
  'steady-state-quenching',
  'other'
]

export interface Species {
  name: string
  class?: string
  smiles?: string
  inchiKey?: string
}
export interface Original {
  value: number
  unit: string
}

/** A decay trace as the open format names it (provenance of a fitted rate). */
export interface TraceRef {
  sha256: string
  file?: string
  timeUnit: 'fs' | 'ps' | 'ns' | 'us' | 'ms' | 's'
  signal: 'transient-absorption' | 'emission' | 'other'
  wavelengthNm?: number
  points: number
}
export type DecayParamName = 'a1' | 'tau1' | 'a2' | 'tau2' | 'offset' | 't0' | 'irfFwhm'
export interface DecayFitRef {
  model: 'mono' | 'bi'
  irf: 'none' | 'gaussian' | 'measured'
  irfSha256?: string
  weighting: 'poisson' | 'given' | 'none'
  component: 'tau1' | 'tau2'
  parameters: Partial<Record<DecayParamName, { value: number, stderr?: number | null, fixed?: boolean }>>
  chiSquaredReduced?: number | null
  status: 'converged' | 'at-bound' | 'stalled'
}
export interface RateProvenance {
  trace: TraceRef
  fit: DecayFitRef
  reference?: TraceRef
  referenceFit?: DecayFitRef
  derivation: 'k = 1/τ' | 'k_ET = 1/τ − 1/τ_ref'
}

export interface RateRecordV1 {
  system: { donor: Species, acceptor: Species, bridge?: Species, linkage: Linkage }
  process: ProcessKind
  initialState: InitialState
  medium: { solvent?: string, permittivity?: number, refractiveIndex?: number, matrix?: string }
  temperatureK: number
  geometry?: { centerToCenterAngstrom?: number, edgeToEdgeAngstrom?: number }
  rate: {
    value: number
    uncertainty?: number
    kind: 'unimolecular' | 'bimolecular'
    method?: 'direct' | 'lifetimes' | 'stern-volmer'
    lifetimeS?: number
    referenceLifetimeS?: number
    original?: Original
  }
  provenance?: RateProvenance
  drivingForce?: {
    value: number
    uncertainty?: number
    method: 'measured' | 'redox-potentials' | 'computed' | 'estimated'
    redox?: {
      donorOxidationPotential: number
      donorReference: string
      acceptorReductionPotential: number
      acceptorReference: string
      referenceOffset?: number
      excitationEnergy: number
      referencePermittivity?: number
      donorRadius?: number
      acceptorRadius?: number
    }
    original?: Original
  }
  reportedParameters?: { lambdaSolvent?: number, lambdaInternal?: number, coupling?: number, vibrationEnergy?: number }
  technique: { method: TechniqueMethod, excitationWavelengthNm?: number, timeResolutionS?: number }
  notes?: string
  location?: string
}

export interface Creator {
  /** "Family, Given" for a person, the name of an organisation */
  name: string
  nameType?: 'Personal' | 'Organizational'
  givenName?: string
  familyName?: string
  orcid?: string
  affiliation?: string
  rorId?: string
}
export interface DatasetMetadataV1 {
  title: string
  description?: string
  creators: Creator[]
  keywords?: string[]
  license: string
  relatedIdentifiers?: { identifier: string, identifierType: string, relationType: string }[]
  funding?: { funderName: string, awardNumber?: string }[]
  embargoUntil?: string
  publicationYear?: number
}

/** The searchable columns (and the bundle CSV line) stored beside each record's JSON. */
