import { describe, expect, it } from 'vitest'
import {
  chargeRecombinationDrivingForce, diffusionLimit, distanceDecay, rateFromLifetimes, rehmWeller, sternVolmer, temperatureSeries,
  transferYield, twoSphereSolventReorganization, PhysicsInputError, BOLTZMANN_EV_PER_K, drivingForceByProcess
} from '../../../../shared/physics'
import worked from '../../../fixtures/physics/worked-checks-mpmath.json'

describe('Rehm–Weller driving force', () => {
  // worked values: mpmath from CODATA 2018 (scripts/reference/worked_checks.py → worked-checks-mpmath.json);
  // the expression is Rehm & Weller, Isr. J. Chem. 8, 259 (1970)
  it('worked check: E_ox 0.85 V, E_red −0.55 V, E₀₀ 2.10 eV, R 10 Å, ε 35.94 → −0.74007 eV', () => {
    const r = rehmWeller({ donorOxidationPotential: 0.85, donorReference: 'SCE', acceptorReductionPotential: -0.55, acceptorReference: 'SCE', excitationEnergy: 2.1, distance: 10, solventPermittivity: 35.94 })
    expect(r.deltaG).toBeCloseTo(worked.checks.rehm_weller.deltaG_eV, 9)
    expect(r.terms.coulomb).toBeCloseTo(worked.checks.rehm_weller.coulomb_eV, 9)
    expect(r.terms.born).toBe(0)
  })
  it('refuses potentials on different reference electrodes unless an offset is recorded', () => {
    const inp = { donorOxidationPotential: 0.85, donorReference: 'SCE', acceptorReductionPotential: -0.55, acceptorReference: 'Fc+/Fc', excitationEnergy: 2.1, distance: 10, solventPermittivity: 35.94 }
    expect(() => rehmWeller(inp)).toThrow(PhysicsInputError)
    expect(() => rehmWeller(inp)).toThrow(/different reference electrodes \(SCE and Fc\+\/Fc\)/)
    // Fc+/Fc ≈ +0.38 V vs SCE in acetonitrile (from memory): E_red(vs SCE) = −0.55 + 0.38
    expect(rehmWeller({ ...inp, referenceOffset: 0.38 }).deltaG).toBeCloseTo(-0.74007 - 0.38, 5)
  })
  it('adds the Born term when the potentials were measured in another solvent', () => {
    const r = rehmWeller({ donorOxidationPotential: 0.85, donorReference: 'SCE', acceptorReductionPotential: -0.55, acceptorReference: 'SCE', excitationEnergy: 2.1, distance: 10, solventPermittivity: 2.38, referencePermittivity: 35.94, donorRadius: 4, acceptorRadius: 4 })
    // (e²/8πε₀)(1/4 + 1/4)(1/2.38 − 1/35.94) (Weller, Z. Phys. Chem. 133, 93 (1982)), by mpmath
    expect(r.terms.born).toBeCloseTo(worked.checks.born_term.value_eV, 9)
    expect(() => rehmWeller({ donorOxidationPotential: 0.85, donorReference: 'SCE', acceptorReductionPotential: -0.55, acceptorReference: 'SCE', excitationEnergy: 2.1, solventPermittivity: 2.38, referencePermittivity: 35.94 })).toThrow(/Ionic radii/)
  })
  it('charge recombination: ΔG°_CR = −(ΔG°_CS + E₀₀)', () => {
    const cs = worked.checks.rehm_weller.deltaG_eV
    expect(chargeRecombinationDrivingForce(cs, 2.1)).toBeCloseTo(worked.checks.charge_recombination.deltaG_eV, 12)
  })
})

describe('reorganization, lifetimes, quenching, analyses', () => {
  it('two-sphere λ_s (Marcus, J. Chem. Phys. 24, 966 (1956)): r = 4, 4 Å, R = 10 Å, n 1.3442, ε 35.94 → 1.13531 eV (mpmath)', () => {
    expect(twoSphereSolventReorganization({ donorRadius: 4, acceptorRadius: 4, distance: 10, refractiveIndex: 1.3442, staticPermittivity: 35.94 }))
      .toBeCloseTo(worked.checks.two_sphere_lambda_s.value_eV, 9)
    expect(() => twoSphereSolventReorganization({ donorRadius: 6, acceptorRadius: 6, distance: 10, refractiveIndex: 1.3, staticPermittivity: 30 })).toThrow(/overlap/)
  })
  it('two-sphere λ_s refuses n² ≥ ε_s (it used to return a negative λ_s)', () => {
    // n = 1.5, ε_s = 2.0: n² = 2.25 > ε_s, so 1/n² − 1/ε_s < 0
    expect(() => twoSphereSolventReorganization({ donorRadius: 4, acceptorRadius: 4, distance: 10, refractiveIndex: 1.5, staticPermittivity: 2 }))
      .toThrow(/Static permittivity ε_s = 2 is not above n² = 2.2500/)
  })
  it('k_ET from lifetimes: τ 0.5 ns, τ_ref 5 ns → 1.8e9 s⁻¹, yield 0.9 (k = 1/τ − 1/τ_ref, by mpmath)', () => {
    const k = rateFromLifetimes(0.5e-9, 5e-9)
    expect(k / worked.checks.rate_from_lifetimes.rate_per_s).toBeCloseTo(1, 12)
    expect(transferYield(k, 0.5e-9)).toBeCloseTo(worked.checks.rate_from_lifetimes.yield, 12)
    expect(() => rateFromLifetimes(5e-9, 5e-9)).toThrow('The lifetime with the acceptor must be shorter than the reference lifetime; no electron-transfer rate can be derived')
  })
  it('diffusion limit 8RT/3η for acetonitrile (η 0.341 mPa s, from memory) ≈ 1.9e10 M⁻¹ s⁻¹', () => {
    expect(diffusionLimit(0.341e-3, 298.15) / 1.94e10).toBeCloseTo(1, 2)
  })
  it('Stern–Volmer slope through the origin and the diffusion-limit flag', () => {
    const tau0 = 1e-6; const kq = 1.5e10
    const pts = [0.001, 0.002, 0.005].map(c => ({ quencherConcentration: c, intensityRatio: 1 + kq * tau0 * c }))
    const r = sternVolmer(pts, tau0, { viscosityPaS: 0.341e-3 })
    expect(r.quenchingRate).toBeCloseTo(kq, -3)
    expect(r.nearDiffusionLimit).toBe(true)
  })
  it('distance decay recovers β from exact exponential data', () => {
    const pts = [10, 12, 14, 16, 18].map(R => ({ distance: R, rate: 1e12 * Math.exp(-1.1 * R) }))
    const r = distanceDecay(pts)
    expect(r.beta).toBeCloseTo(1.1, 10)
    expect(r.rSquared).toBeCloseTo(1, 12)
  })
  it('temperature series: Arrhenius E_a and the Marcus form recover an activation energy of 0.2 eV', () => {
    const pts = [200, 240, 280, 320, 360].map(T => ({ temperatureK: T, rate: 1e11 / Math.sqrt(T) * Math.exp(-0.2 / (BOLTZMANN_EV_PER_K * T)) }))
    const r = temperatureSeries(pts)
    expect(r.marcus.activationFreeEnergy).toBeCloseTo(0.2, 10)
    // d ln k / d(1/T) = T/2 − E/k_B: the T^-½ prefactor lowers the apparent Arrhenius energy by ≈ k_B T̄/2
    expect(r.arrhenius.activationEnergy).toBeCloseTo(0.2 - BOLTZMANN_EV_PER_K * 280 / 2, 2)
  })
})

describe('ΔG° from potentials by process (worked checks by mpmath: E_ox 0.85 V, E_red −0.55 V, E₀₀ 2.10 eV, R 10 Å, ε 35.94)', () => {
  const inp = { donorOxidationPotential: 0.85, donorReference: 'SCE', acceptorReductionPotential: -0.55, acceptorReference: 'SCE', excitationEnergy: 2.1, distance: 10, solventPermittivity: 35.94 }
  it('charge separation: Rehm–Weller with the ion-pair term → −0.74007 eV', () => {
    expect(drivingForceByProcess('charge-separation', inp).deltaG).toBeCloseTo(worked.checks.rehm_weller.deltaG_eV, 9)
  })
  it('charge recombination: −(ΔG°_CS + E₀₀) → −1.35993 eV, with or without E₀₀ given', () => {
    const cr = worked.checks.charge_recombination.deltaG_eV
    expect(drivingForceByProcess('charge-recombination', inp).deltaG).toBeCloseTo(cr, 9)
    expect(drivingForceByProcess('charge-recombination', { ...inp, excitationEnergy: 0 }).deltaG).toBeCloseTo(cr, 9)
  })
  it('charge shift and hole transfer: no ion-pair term → −0.70 eV', () => {
    expect(drivingForceByProcess('charge-shift', inp).deltaG).toBeCloseTo(-0.70, 10)
    expect(drivingForceByProcess('hole-transfer', inp).deltaG).toBeCloseTo(-0.70, 10)
  })
  it('"other" has no derivation: the field is named', () => {
    expect(() => drivingForceByProcess('other', inp)).toThrow(/cannot be derived from potentials for process "other"/)
  })
})
