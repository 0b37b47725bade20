/** One flat row (CSV/XLSX line or entry form) to a canonical record: units converted, values derived with their formula. */
import type {
  PhysicsInputError, RehmWellerInput, DistanceUnit, EnergyUnit, PotentialUnit, RateUnit, TemperatureUnit, TimeUnit
} from '../physics'
import {
  distanceToAngstrom, energyToEv, potentialToVolt, rateFromLifetimes, rateToPerSecond, drivingForceByProcess,
  temperatureToK, timeToSeconds, wavelengthNmToEv, LIFETIME_FORMULA
} from '../physics'
import { COLUMN_BY_KEY } from './columns'
import type { RateRecordV1 } from './types'
import {
  type Cell, type Derivation, type IngestContext, MAX_CELL_LENGTH, type RowIssue, type RowResult, isBlank,
  parseDecimal
} from './ingest-types'

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
            ...(redox as Omit<RehmWellerInput, 'distance' | 'solventPermittivity'>),
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
