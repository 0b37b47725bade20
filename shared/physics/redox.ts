/**
 * Driving force from redox potentials (Rehm–Weller with Coulomb and Born work terms) and the
 * charge-recombination driving force. Potentials in V, energies in eV, distances in Å.
 */
import { COULOMB_EV_ANGSTROM } from './constants'
import { IssueCollector, PhysicsInputError } from './errors'

export const REFERENCE_ELECTRODES = ['SCE', 'SHE', 'NHE', 'Ag/AgCl', 'Ag/Ag+', 'Fc+/Fc', 'other'] as const
export type ReferenceElectrode = (typeof REFERENCE_ELECTRODES)[number]

export interface RehmWellerInput {
  /** Oxidation potential of the donor, E(D⁺/D), V. */
  donorOxidationPotential: number
  /** Reference electrode of the donor potential. */
  donorReference: string
  /** Reduction potential of the acceptor, E(A/A⁻), V. */
  acceptorReductionPotential: number
  /** Reference electrode of the acceptor potential. */
  acceptorReference: string
  /**
   * Recorded offset (V) added to the acceptor potential to put it on the donor's reference scale.
   * Required when the two references differ; never guessed.
   */
  referenceOffset?: number
  /** Excitation energy E₀₀ of the excited partner, eV (0 for a thermal, ground-state reaction). */
  excitationEnergy: number
  /** Centre-to-centre distance R_DA, Å; without it the Coulomb term is left out (e.g. charge shift). */
  distance?: number
  /** Static permittivity of the reaction solvent ε_s. */
  solventPermittivity: number
  /** Permittivity of the solvent the potentials were measured in, ε_ref (default: ε_s, Born term 0). */
  referencePermittivity?: number
  /** Ionic radii of donor and acceptor, Å (needed for the Born term when ε_ref ≠ ε_s). */
  donorRadius?: number
  acceptorRadius?: number
}

export interface RehmWellerResult {
  /** ΔG°_CS, eV (negative = downhill). */
  deltaG: number
  /** The parts that add up to ΔG°, eV. */
  terms: { redox: number, excitation: number, coulomb: number, born: number }
  /** The formula used, for display. */
  formula: string
}

export const REHM_WELLER_FORMULA
  = 'ΔG° = e[E_ox(D⁺/D) − E_red(A/A⁻)] − E₀₀ − e²/(4πε₀ε_sR) + (e²/8πε₀)(1/r_D + 1/r_A)(1/ε_s − 1/ε_ref)'

/** Rehm–Weller driving force for photoinduced charge separation. Throws on any bad input, all issues at once. */
export function rehmWeller (inp: RehmWellerInput): RehmWellerResult {
  const c = new IssueCollector()
  c.finite(inp.donorOxidationPotential, '/donorOxidationPotential', 'Donor oxidation potential')
  c.finite(inp.acceptorReductionPotential, '/acceptorReductionPotential', 'Acceptor reduction potential')
  c.nonNegative(inp.excitationEnergy, '/excitationEnergy', 'Excitation energy E₀₀')
  c.positive(inp.solventPermittivity, '/solventPermittivity', 'Solvent permittivity ε_s')
  if (inp.distance !== undefined) c.positive(inp.distance, '/distance', 'Donor–acceptor distance')
  if (inp.referencePermittivity !== undefined)
    c.positive(inp.referencePermittivity, '/referencePermittivity', 'Permittivity ε_ref')
  if (inp.donorRadius !== undefined) c.positive(inp.donorRadius, '/donorRadius', 'Donor radius')
  if (inp.acceptorRadius !== undefined) c.positive(inp.acceptorRadius, '/acceptorRadius', 'Acceptor radius')
  const sameRef = normalizeReference(inp.donorReference) === normalizeReference(inp.acceptorReference)
  if (!sameRef && inp.referenceOffset === undefined) {
    c.add(
      '/acceptorReference',
      `Potentials are against different reference electrodes (${inp.donorReference} and ${inp.acceptorReference}); `
      + `record the offset between them in referenceOffset`
    )
  }
  if (inp.referenceOffset !== undefined) c.finite(inp.referenceOffset, '/referenceOffset', 'Reference offset')
  const epsRef = inp.referencePermittivity ?? inp.solventPermittivity
  const needsBorn = inp.referencePermittivity !== undefined && inp.referencePermittivity !== inp.solventPermittivity
  if (needsBorn && (inp.donorRadius === undefined || inp.acceptorRadius === undefined)) {
    c.add(
      inp.donorRadius === undefined ? '/donorRadius' : '/acceptorRadius',
      'Ionic radii of donor and acceptor are needed when the potentials were measured in another solvent'
    )
  }
  c.throwIfAny()
  const eRed = inp.acceptorReductionPotential + (sameRef ? 0 : inp.referenceOffset!)
  const redox = inp.donorOxidationPotential - eRed
  const coulomb = inp.distance === undefined ? 0 : -COULOMB_EV_ANGSTROM / (inp.solventPermittivity * inp.distance)
  const born = needsBorn
    ? (COULOMB_EV_ANGSTROM / 2)
    * (1 / inp.donorRadius! + 1 / inp.acceptorRadius!)
    * (1 / inp.solventPermittivity - 1 / epsRef)
    : 0
  const excitation = -inp.excitationEnergy
  return {
    deltaG: redox + excitation + coulomb + born,
    terms: { redox, excitation, coulomb, born },
    formula: REHM_WELLER_FORMULA
  }
}

/** Charge recombination to the ground state: ΔG°_CR = −(ΔG°_CS + E₀₀). */
export function chargeRecombinationDrivingForce (deltaGChargeSeparation: number, excitationEnergy: number): number {
  return -(deltaGChargeSeparation + excitationEnergy)
}

function normalizeReference (r: string): string {
  const s = String(r ?? '')
    .trim()
    .toLowerCase()
    .replace(/\s+/g, '')
  return s === 'nhe' ? 'she' : s // NHE and SHE are treated as one scale (they differ by < 1 mV)
}

/** Processes as the record format names them. */
export type DerivationProcess
  = 'charge-separation' | 'charge-recombination' | 'charge-shift' | 'hole-transfer' | 'other'

export const CHARGE_RECOMBINATION_FORMULA
  = 'ΔG°_CR = −(ΔG°_CS + E₀₀) = −(e[E_ox(D⁺/D) − E_red(A/A⁻)] − e²/(4πε₀ε_sR) + (e²/8πε₀)(1/r_D + 1/r_A)(1/ε_s − 1/ε_ref)); E₀₀ cancels'
export const CHARGE_SHIFT_FORMULA
  = 'ΔG° = e[E_ox − E_red] − E₀₀ (no ion pair is formed or destroyed: no Coulomb or Born term; E₀₀ = 0 for a thermal step)'

export interface ProcessDerivation extends RehmWellerResult {
  process: DerivationProcess
  /** Short name of the derivation, for messages. */
  name: string
}

/**
 * ΔG° from redox potentials by process — the one function that the upload, the entry form, the API's
 * check and the record page use (Rehm & Weller 1970; Weller 1982):
 * - charge separation: Rehm–Weller with the ion-pair (Coulomb) and Born terms;
 * - charge recombination to the ground state: −(ΔG°_CS + E₀₀), in which E₀₀ cancels (not needed);
 * - charge shift and hole/electron transfer between ions: e[E_ox − E_red] − E₀₀, no ion-pair term.
 * 'other' has no defined derivation: the caller must give ΔG° itself.
 */
export function drivingForceByProcess (process: string | undefined, inp: RehmWellerInput): ProcessDerivation {
  if (
    process !== 'charge-separation'
    && process !== 'charge-recombination'
    && process !== 'charge-shift'
    && process !== 'hole-transfer'
  ) {
    throw new PhysicsInputError([
      {
        path: '/process',
        message: `ΔG° cannot be derived from potentials for process "${process ?? ''}": give ΔG° directly, or set the `
          + `process to charge-separation, charge-recombination, charge-shift or hole-transfer`
      }
    ])
  }
  if (process === 'charge-separation') return { ...rehmWeller(inp), process, name: 'Rehm–Weller for charge separation' }
  if (process === 'charge-recombination') {
    // E₀₀ cancels: evaluate the charge-separation terms without it, then change sign.
    const cs = rehmWeller({ ...inp, excitationEnergy: 0 })
    const t = cs.terms
    return {
      process,
      name: 'charge recombination, −(ΔG°_CS + E₀₀)',
      deltaG: -(t.redox + t.coulomb + t.born),
      terms: { redox: -t.redox, excitation: 0, coulomb: -t.coulomb, born: -t.born },
      formula: CHARGE_RECOMBINATION_FORMULA
    }
  }
  // charge shift / hole transfer: no work terms; the permittivities and radii play no part
  const r = rehmWeller({
    ...inp,
    distance: undefined,
    referencePermittivity: undefined,
    donorRadius: undefined,
    acceptorRadius: undefined
  })
  return {
    process,
    name: `${process}, e[E_ox − E_red] − E₀₀ without an ion-pair term`,
    deltaG: r.terms.redox + r.terms.excitation,
    terms: { ...r.terms, coulomb: 0, born: 0 },
    formula: CHARGE_SHIFT_FORMULA
  }
}
