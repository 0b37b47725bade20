/** Reorganization-energy estimates. Distances in Å, energies in eV. */
import { COULOMB_EV_ANGSTROM } from './constants'
import { IssueCollector } from './errors'

export interface TwoSphereInput {
  donorRadius: number
  acceptorRadius: number
  /** Centre-to-centre distance, Å. */
  distance: number
  /** Refractive index n (optical permittivity n²). */
  refractiveIndex: number
  /** Static permittivity ε_s. */
  staticPermittivity: number
}

export const TWO_SPHERE_FORMULA = 'λ_s = (e²/4πε₀)(1/(2r_D) + 1/(2r_A) − 1/R)(1/n² − 1/ε_s)'

/** Solvent polarity factor 1/n² − 1/ε_s (the Pekar factor). */
export function pekarFactor (refractiveIndex: number, staticPermittivity: number): number {
  return 1 / (refractiveIndex * refractiveIndex) - 1 / staticPermittivity
}

/** Marcus two-sphere estimate of the solvent reorganization energy λ_s, eV. */
export function twoSphereSolventReorganization (inp: TwoSphereInput): number {
  const c = new IssueCollector()
  c.positive(inp.donorRadius, '/donorRadius', 'Donor radius')
  c.positive(inp.acceptorRadius, '/acceptorRadius', 'Acceptor radius')
  c.positive(inp.distance, '/distance', 'Distance')
  c.positive(inp.refractiveIndex, '/refractiveIndex', 'Refractive index')
  c.positive(inp.staticPermittivity, '/staticPermittivity', 'Static permittivity')
  c.throwIfAny()
  if (inp.distance < inp.donorRadius + inp.acceptorRadius) {
    c.add('/distance', 'The spheres overlap: the distance must be at least the sum of the two radii')
  }
  if (inp.refractiveIndex < 1) c.add('/refractiveIndex', 'Refractive index must be at least 1')
  if (inp.staticPermittivity < 1) c.add('/staticPermittivity', 'Static permittivity must be at least 1')
  c.throwIfAny()
  // A static permittivity below the optical one (ε_s < n²) has no physical meaning for a dielectric
  // at rest, and would give a negative λ_s: refuse rather than return it.
  if (pekarFactor(inp.refractiveIndex, inp.staticPermittivity) <= 0) {
    c.add(
      '/staticPermittivity',
      `Static permittivity ε_s = ${inp.staticPermittivity} is not above n² = ${(inp.refractiveIndex ** 2).toFixed(4)}: `
      + `the solvent term would be zero or negative; check the two values`
    )
  }
  c.throwIfAny()
  const geometry = 1 / (2 * inp.donorRadius) + 1 / (2 * inp.acceptorRadius) - 1 / inp.distance
  return COULOMB_EV_ANGSTROM * geometry * pekarFactor(inp.refractiveIndex, inp.staticPermittivity)
}
