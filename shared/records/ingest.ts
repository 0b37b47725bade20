/**
 * From a flat row (a CSV/XLSX line or the entry form) to a canonical rate record: unit conversion,
 * derived values (rate from lifetimes, ΔG° from potentials) with the formula used, then the checks
 * every path shares (schema + the semantic rules in checkRecord). Pure: the caller passes the
 * compiled schema validator and the solvent table.
 */
import type { ErrorObject } from 'ajv'
import type {
  PhysicsInputError,
  DistanceUnit,
  EnergyUnit,
  PotentialUnit,
  RateUnit,
  TemperatureUnit,
  TimeUnit
} from '../physics'
import {
  convertEnergy,
  diffusionLimit,
  distanceToAngstrom,
  energyToEv,
  potentialToVolt,
  rateFromLifetimes,
  rateToPerSecond,
  drivingForceByProcess,
  temperatureToK,
  timeToSeconds,
  wavelengthNmToEv,
  WAVENUMBER_PER_EV,
  LIFETIME_FORMULA
} from '../physics'
import { COLUMN_BY_KEY, columnForPointer } from './columns'
import type { RateRecordV1 } from './types'

export interface SolventRow {
  name: string
  permittivity: number
  refractiveIndex: number
  viscosity: number | null
}
export interface IngestContext {
  solvents: Map<string, SolventRow>
}
export interface RowIssue {
  row?: number
  column?: string
  path: string
  message: string
}
export interface Derivation {
  field: string
  formula: string
  value: number
  unit: string
}
export interface RowResult {
  record?: RateRecordV1
  issues: RowIssue[]
  warnings: RowIssue[]
  derived: Derivation[]
}
export type Cell = string | number | null | undefined
export type SchemaValidator = ((data: unknown) => boolean) & { errors?: ErrorObject[] | null }

export const MAX_CELL_LENGTH = 2000

/**
 * A plain decimal number (optional sign, digits with an optional point, optional exponent) or undefined.
 * JavaScript's Number() also takes "0x10" (16), "0b101", "0o17", "Infinity" and whitespace-only text, none
 * of which a measured value is written as.
 */
export const DECIMAL = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/
export function parseDecimal (text: string): number | undefined {
  const t = text.trim()
  return DECIMAL.test(t) ? Number(t) : undefined
}

function isBlank (v: Cell): boolean {
  return v === null || v === undefined || (typeof v === 'string' && v.trim() === '')
}

/**
 * Builds the record from cells keyed by column key; `units` gives each dimensioned column's unit
 * (from its header or the form's unit picker).
 */
export function rowToRecord (
  cells: Record<string, Cell>,
  units: Record<string, string | undefined>,
  ctx: IngestContext
): RowResult {
  const issues: RowIssue[] = []
  const derived: Derivation[] = []
  const issue = (column: string, message: string) =>
    issues.push({ column, path: COLUMN_BY_KEY.get(column)?.pointer ?? '/', message })
  const text = (k: string): string | undefined => {
    const v = cells[k]
    if (isBlank(v)) return undefined
    const s = String(v).trim()
    if (s.length > MAX_CELL_LENGTH) {
      issue(k, `is longer than ${MAX_CELL_LENGTH} characters`)
      return undefined
    }
    return s
  }
  const num = (k: string): number | undefined => {
    const v = cells[k]
    if (isBlank(v)) return undefined
    const n = typeof v === 'number' ? v : parseDecimal(String(v))
    if (n === undefined || !Number.isFinite(n)) {
      issue(k, `"${String(v).slice(0, 40)}" is not a finite number`)
      return undefined
    }
    return n
  }
  const unitOf = (k: string): string | undefined => {
    const def = COLUMN_BY_KEY.get(k)!
    const u = units[k] ?? def.units?.[0]
    if (def.units && u && !def.units.includes(u)) {
      issue(k, `unknown unit "${u}"; use one of: ${def.units.join(', ')}`)
      return undefined
    }
    return u
  }
  const energy = (k: string): number | undefined => {
    const v = num(k)
    const u = unitOf(k)
    if (v === undefined || !u) return undefined
    return energyToEv(v, u as EnergyUnit)
  }

  const donor = text('donor_name')
  const acceptor = text('acceptor_name')
  const rec: Record<string, any> = {
    system: {
      donor: {
        name: donor,
        ...(text('donor_class') ? { class: text('donor_class') } : {}),
        ...(text('donor_smiles') ? { smiles: text('donor_smiles') } : {})
      },
      acceptor: {
        name: acceptor,
        ...(text('acceptor_class') ? { class: text('acceptor_class') } : {}),
        ...(text('acceptor_smiles') ? { smiles: text('acceptor_smiles') } : {})
      },
      ...(text('bridge_name') ? { bridge: { name: text('bridge_name') } } : {}),
      linkage: text('linkage')
    },
    process: text('process'),
    initialState: text('initial_state'),
    medium: {},
    technique: { method: text('technique') }
  }
  if (donor === undefined) delete rec.system.donor.name
  if (acceptor === undefined) delete rec.system.acceptor.name
  for (const k of ['linkage']) if (rec.system[k] === undefined) delete rec.system[k]
  for (const k of ['process', 'initialState']) if (rec[k] === undefined) delete rec[k]
  if (rec.technique.method === undefined) delete rec.technique.method

  // medium: named solvents fill ε and n from the reference table unless the row gives them
  const solvent = text('solvent')
  const matrix = text('matrix')
  const known = solvent ? ctx.solvents.get(solvent.toLowerCase()) : undefined
  const eps = num('permittivity') ?? known?.permittivity
  const n = num('refractive_index') ?? known?.refractiveIndex
  if (solvent) rec.medium.solvent = known?.name ?? solvent
  if (matrix) rec.medium.matrix = matrix
  if (eps !== undefined) rec.medium.permittivity = eps
  if (n !== undefined) rec.medium.refractiveIndex = n

  const T = num('temperature')
  const tu = unitOf('temperature')
  if (T !== undefined && tu) rec.temperatureK = temperatureToK(T, tu as TemperatureUnit)
  const geometry: Record<string, number> = {}
  for (const [k, f] of [
    ['distance_cc', 'centerToCenterAngstrom'],
    ['distance_ee', 'edgeToEdgeAngstrom']
  ] as const) {
    const v = num(k)
    const u = unitOf(k)
    if (v !== undefined && u) geometry[f] = distanceToAngstrom(v, u as DistanceUnit)
  }
  if (Object.keys(geometry).length) rec.geometry = geometry

  // rate: given directly, or from the two lifetimes
  const rateV = num('rate')
  const rateU = unitOf('rate')
  const tau = num('lifetime')
  const tauU = unitOf('lifetime')
  const tauRef = num('reference_lifetime')
  const tauRefU = unitOf('reference_lifetime')
  const bimolecular = rateU === 'M-1 s-1'
  const toCanonicalRate = (v: number, u: string) => (u === 'M-1 s-1' ? v : rateToPerSecond(v, u as RateUnit))
  if (rateV !== undefined && rateU) {
    rec.rate = {
      value: toCanonicalRate(rateV, rateU),
      kind: bimolecular ? 'bimolecular' : 'unimolecular',
      method: 'direct'
    }
    if (rateU !== 's-1' && rateU !== 'M-1 s-1') rec.rate.original = { value: rateV, unit: rateU }
  }
  else if (tau !== undefined && tauRef !== undefined && tauU && tauRefU) {
    const t = timeToSeconds(tau, tauU as TimeUnit)
    const tr = timeToSeconds(tauRef, tauRefU as TimeUnit)
    try {
      const k = rateFromLifetimes(t, tr)
      rec.rate = { value: k, kind: 'unimolecular', method: 'lifetimes', lifetimeS: t, referenceLifetimeS: tr }
      derived.push({ field: 'rate', formula: LIFETIME_FORMULA, value: k, unit: 's-1' })
    }
    catch (e) {
      issue('lifetime', (e as PhysicsInputError).issues?.[0]?.message ?? String(e))
    }
  }
  else if (tau !== undefined || tauRef !== undefined) {
    issue(
      tau === undefined ? 'lifetime' : 'reference_lifetime',
      'give both lifetimes (with and without the acceptor) to derive the rate'
    )
  }
  else {
    issue('rate', 'is required (or give lifetime and reference_lifetime)')
  }
  const ru = num('rate_uncertainty')
  const ruU = unitOf('rate_uncertainty')
  if (rec.rate && ru !== undefined && ruU) rec.rate.uncertainty = toCanonicalRate(ru, ruU)

  // driving force: given, or from potentials (Rehm–Weller)
  const dg = energy('delta_g')
  const method = text('delta_g_method')
  const eOx = num('donor_oxidation_potential')
  const eRed = num('acceptor_reduction_potential')
  if (dg !== undefined) {
    rec.drivingForce = { value: dg, method: method ?? 'measured' }
    const u = unitOf('delta_g')
    if (u && u !== 'eV') rec.drivingForce.original = { value: num('delta_g'), unit: u }
  }
  if (eOx !== undefined || eRed !== undefined) {
    const redox: Record<string, any> = {
      donorOxidationPotential:
        eOx === undefined
          ? undefined
          : potentialToVolt(eOx, (unitOf('donor_oxidation_potential') ?? 'V') as PotentialUnit),
      donorReference: text('donor_reference'),
      acceptorReductionPotential:
        eRed === undefined
          ? undefined
          : potentialToVolt(eRed, (unitOf('acceptor_reduction_potential') ?? 'V') as PotentialUnit),
      acceptorReference: text('acceptor_reference')
    }
    const off = num('reference_offset')
    if (off !== undefined)
      redox.referenceOffset = potentialToVolt(off, (unitOf('reference_offset') ?? 'V') as PotentialUnit)
    const exV = num('excitation_energy')
    const exU = unitOf('excitation_energy')
    redox.excitationEnergy
      = exV === undefined || !exU ? 0 : exU === 'nm' ? wavelengthNmToEv(exV) : energyToEv(exV, exU as EnergyUnit)
    if (exU === 'nm' && exV !== undefined)
      derived.push({ field: 'excitation_energy', formula: 'E₀₀ = hc/λ', value: redox.excitationEnergy, unit: 'eV' })
    for (const [k, col] of [
      ['donorOxidationPotential', 'donor_oxidation_potential'],
      ['donorReference', 'donor_reference'],
      ['acceptorReductionPotential', 'acceptor_reduction_potential'],
      ['acceptorReference', 'acceptor_reference']
    ] as const) {
      if (redox[k] === undefined) issue(col, 'is required when potentials are given')
    }
    for (const k of Object.keys(redox)) if (redox[k] === undefined) delete redox[k]
    if (
      dg === undefined
      && redox.donorReference
      && redox.acceptorReference
      && eOx !== undefined
      && eRed !== undefined
    ) {
      if (eps === undefined)
        issue('permittivity', 'is needed to compute ΔG° from potentials (name a solvent from the table or give ε)')
      else {
        try {
          const rw = drivingForceByProcess(rec.process, {
            ...(redox as never),
            distance: geometry.centerToCenterAngstrom,
            solventPermittivity: eps
          })
          rec.drivingForce = { value: rw.deltaG, method: 'redox-potentials', redox }
          derived.push({ field: 'delta_g', formula: rw.formula, value: rw.deltaG, unit: 'eV' })
        }
        catch (e) {
          for (const i of (e as PhysicsInputError).issues ?? [])
            issue(
              i.path === '/acceptorReference'
                ? 'acceptor_reference'
                : i.path === '/process'
                  ? 'process'
                  : 'donor_oxidation_potential',
              i.message
            )
        }
      }
    }
    else if (rec.drivingForce) rec.drivingForce.redox = redox
  }
  const dgu = energy('delta_g_uncertainty')
  if (rec.drivingForce && dgu !== undefined) rec.drivingForce.uncertainty = dgu

  const params: Record<string, number> = {}
  for (const [k, f] of [
    ['lambda_solvent', 'lambdaSolvent'],
    ['lambda_internal', 'lambdaInternal'],
    ['coupling', 'coupling'],
    ['vibration_energy', 'vibrationEnergy']
  ] as const) {
    const v = energy(k)
    if (v !== undefined) params[f] = v
  }
  if (Object.keys(params).length) rec.reportedParameters = params
  const ex = num('excitation_wavelength')
  if (ex !== undefined) rec.technique.excitationWavelengthNm = ex
  const tr = num('time_resolution')
  const trU = unitOf('time_resolution')
  if (tr !== undefined && trU) rec.technique.timeResolutionS = timeToSeconds(tr, trU as TimeUnit)
  const notes = text('notes')
  if (notes) rec.notes = notes
  const loc = text('location')
  if (loc) rec.location = loc
  for (const [k, def] of COLUMN_BY_KEY)
    if (def.required && isBlank(cells[k]) && !issues.some(i => i.column === k)) issue(k, 'is required')
  return { record: rec as RateRecordV1, issues, warnings: [], derived }
}

/** Rules beyond the schema, the same for the form, uploads and the API. */
export function checkRecord (r: RateRecordV1, ctx: IngestContext): { issues: RowIssue[], warnings: RowIssue[] } {
  const issues: RowIssue[] = []
  const warnings: RowIssue[] = []
  const at = (list: RowIssue[], path: string, message: string) =>
    list.push({ path, column: columnForPointer(path), message })
  if (r.rate.method === 'lifetimes') {
    const t = r.rate.lifetimeS
    const tr = r.rate.referenceLifetimeS
    if (t === undefined || tr === undefined)
      at(issues, '/rate/method', 'a rate from lifetimes needs lifetimeS and referenceLifetimeS')
    else if (t >= tr)
      at(
        issues,
        '/rate/lifetimeS',
        'The lifetime with the acceptor must be shorter than the reference lifetime; no electron-transfer rate can be derived'
      )
    // 0.1 % leaves room for lifetimes and rates reported to four significant figures (common practice)
    else if (Math.abs(r.rate.value - (1 / t - 1 / tr)) > 1e-3 * r.rate.value)
      at(issues, '/rate/value', `does not equal 1/τ − 1/τ_ref = ${(1 / t - 1 / tr).toExponential(4)} s⁻¹`)
  }
  const df = r.drivingForce
  if (df?.method === 'redox-potentials') {
    if (!df.redox) at(issues, '/drivingForce/redox', 'is required when the method is redox-potentials')
    else {
      const eps = r.medium.permittivity
      if (eps === undefined) at(issues, '/medium/permittivity', 'is needed to check ΔG° against the potentials')
      else {
        try {
          const rw = drivingForceByProcess(r.process, {
            ...df.redox,
            distance: r.geometry?.centerToCenterAngstrom,
            solventPermittivity: eps
          })
          if (Math.abs(rw.deltaG - df.value) > 0.005)
            at(
              issues,
              '/drivingForce/value',
              `does not match the potentials: ${rw.name} gives ${rw.deltaG.toFixed(3)} eV`
            )
        }
        catch (e) {
          for (const i of (e as PhysicsInputError).issues ?? [])
            at(issues, i.path === '/process' ? '/process' : '/drivingForce/redox' + i.path, i.message)
        }
      }
    }
  }
  if (df?.redox && df.redox.donorReference !== df.redox.acceptorReference && df.redox.referenceOffset !== undefined) {
    at(
      warnings,
      '/drivingForce/redox/referenceOffset',
      `mixed reference electrodes (${df.redox.donorReference}, ${df.redox.acceptorReference}); the recorded offset of `
      + `${df.redox.referenceOffset} V was applied`
    )
  }
  // usual ranges: SCIENCE.md, common practice, no single source
  if (r.rate.kind === 'unimolecular' && (r.rate.value < 1e3 || r.rate.value > 1e14))
    at(warnings, '/rate/value', `${r.rate.value.toExponential(2)} s⁻¹ is outside the usual 1e3–1e14 s⁻¹`)
  if (r.rate.kind === 'unimolecular' && r.rate.value > 6e12 * (r.temperatureK / 298.15))
    at(warnings, '/rate/value', 'is above k_BT/h, the activationless ceiling of a non-adiabatic rate')
  if (r.rate.kind === 'bimolecular') {
    const s = r.medium.solvent ? ctx.solvents.get(r.medium.solvent.toLowerCase()) : undefined
    if (s?.viscosity) {
      const kd = diffusionLimit(s.viscosity * 1e-3, r.temperatureK)
      if (r.rate.value >= 0.5 * kd)
        at(
          warnings,
          '/rate/value',
          `is near the diffusion limit (k_diff ≈ ${kd.toExponential(2)} M⁻¹ s⁻¹ in ${s.name}); it says little about `
          + `the electron-transfer step`
        )
    }
    if (r.system.linkage !== 'bimolecular')
      at(warnings, '/system/linkage', 'a bimolecular rate usually goes with linkage "bimolecular"')
  }
  if (df && Math.abs(df.value) > 3.5)
    at(warnings, '/drivingForce/value', `|ΔG°| = ${Math.abs(df.value).toFixed(2)} eV is beyond the usual 3.5 eV`)
  const p = r.reportedParameters
  if (p?.lambdaSolvent !== undefined && (p.lambdaSolvent < 0.1 || p.lambdaSolvent > 2))
    at(warnings, '/reportedParameters/lambdaSolvent', 'λ_s outside the usual 0.1–2 eV')
  if (p?.lambdaInternal !== undefined && (p.lambdaInternal < 0.05 || p.lambdaInternal > 0.8))
    at(warnings, '/reportedParameters/lambdaInternal', 'λ_i outside the usual 0.05–0.8 eV')
  if (p?.vibrationEnergy !== undefined && (p.vibrationEnergy < 0.06 || p.vibrationEnergy > 0.25))
    at(warnings, '/reportedParameters/vibrationEnergy', 'ħω outside the usual 0.06–0.25 eV')
  if (p?.coupling !== undefined) {
    const cm = p.coupling * WAVENUMBER_PER_EV
    if (cm < 0.1 || cm > 1000)
      at(warnings, '/reportedParameters/coupling', `V = ${cm.toPrecision(3)} cm⁻¹ is outside the usual 0.1–1000 cm⁻¹`)
  }
  if (r.temperatureK < 4 || r.temperatureK > 500)
    at(warnings, '/temperatureK', `${r.temperatureK} K is unusual for a rate measurement`)
  return { issues, warnings }
}

/** Schema errors as row issues with the column they belong to. */
export function schemaIssues (errors: ErrorObject[] | null | undefined): RowIssue[] {
  return (errors ?? [])
    .filter(e => (e.keyword !== 'if' && e.keyword !== 'anyOf') || e.instancePath === '/medium')
    .map((e) => {
      let path = e.instancePath
      let message = e.message ?? 'is not valid'
      if (e.keyword === 'required') {
        path += `/${(e.params as { missingProperty: string }).missingProperty}`
        message = 'is required'
      }
      if (e.keyword === 'additionalProperties') {
        path += `/${(e.params as { additionalProperty: string }).additionalProperty}`
        message = 'is not a field of the record format'
      }
      if (e.keyword === 'enum')
        message = `must be one of: ${(e.params as { allowedValues: unknown[] }).allowedValues.join(', ')}`
      if (e.keyword === 'anyOf' && e.instancePath === '/medium') message = 'needs a solvent or a matrix'
      return { path: path || '/', column: columnForPointer(path), message }
    })
}

/** The full check of one canonical record: schema, then the shared rules. */
export function validateRecord (
  record: unknown,
  validate: SchemaValidator,
  ctx: IngestContext
): { issues: RowIssue[], warnings: RowIssue[] } {
  if (!validate(record)) return { issues: dedupe(schemaIssues(validate.errors)), warnings: [] }
  return checkRecord(record as RateRecordV1, ctx)
}

/** Row → record → full check, as the upload and the form do it. */
export function ingestRow (
  cells: Record<string, Cell>,
  units: Record<string, string | undefined>,
  validate: SchemaValidator,
  ctx: IngestContext
): RowResult {
  const built = rowToRecord(cells, units, ctx)
  if (built.issues.length) return { ...built, record: undefined }
  const v = validateRecord(built.record, validate, ctx)
  return { ...built, issues: v.issues, warnings: v.warnings, record: v.issues.length ? undefined : built.record }
}

function dedupe (xs: RowIssue[]): RowIssue[] {
  const seen = new Set<string>()
  return xs.filter((x) => {
    const k = `${x.path}|${x.message}`
    if (seen.has(k)) return false
    seen.add(k)
    return true
  })
}

export { convertEnergy }
