/** A record's values as the record page lists them: words, units and at most four significant digits. */
import { drivingForceByProcess, PhysicsInputError } from '#shared/physics'
import type { RateRecordV1 } from '#shared/records/types'
import { termSymbol, unitLabel } from '#shared/vocabulary'

/** How ΔG° follows from the potentials for this record's process (the same function the deposit paths use). */
export function derivationText (r: RateRecordV1 | undefined): string {
  if (!r) return '—'
  const df = r.drivingForce
  if (df?.method !== 'redox-potentials' || !df.redox || r.medium?.permittivity === undefined) return '—'
  try {
    const d = drivingForceByProcess(r.process, {
      ...df.redox,
      distance: r.geometry?.centerToCenterAngstrom,
      solventPermittivity: r.medium.permittivity
    })
    const same = Math.abs(d.deltaG - df.value) <= 0.005
    return (
      `${d.formula} → ${d.deltaG.toFixed(4)} eV`
      + (same
        ? ''
        : ` — differs from the stored ${df.value} eV (the stored value was derived by an earlier rule; a curator can `
          + `issue a corrected version)`)
    )
  }
  catch (e) {
    return e instanceof PhysicsInputError ? e.issues[0]!.message : String(e)
  }
}

/** A stored value as a person reads it: at most `digits` significant digits, no binary noise (−1.0057730281581052 → −1.006). */
const sig = (v: number, digits = 4) => String(Number(v.toPrecision(digits)))

export function recordRows (r: RateRecordV1 | undefined, derivation: string): [string, string][] {
  if (!r) return []
  return [
    ['Donor', r.system?.donor?.name + (r.system?.donor?.class ? ` (${r.system.donor.class})` : '')],
    ['Acceptor', r.system?.acceptor?.name + (r.system?.acceptor?.class ? ` (${r.system.acceptor.class})` : '')],
    ['Bridge', r.system?.bridge?.name ?? '—'],
    ['Linkage', r.system?.linkage],
    ['Process', label(r.process)],
    ['Initial state', r.initialState],
    ['Medium', r.medium?.solvent ?? r.medium?.matrix ?? '—'],
    ['ε_s / n', r.medium?.permittivity ? `${r.medium.permittivity} / ${r.medium.refractiveIndex ?? '—'}` : '—'],
    ['Temperature', `${r.temperatureK} K`],
    ['Distance (centre–centre)', r.geometry?.centerToCenterAngstrom ? `${r.geometry.centerToCenterAngstrom} Å` : '—'],
    [
      'Rate constant',
      `${fmtRate(r.rate?.value)} ${r.rate?.kind === 'bimolecular' ? 'M⁻¹ s⁻¹' : 's⁻¹'}`
      + (r.rate?.uncertainty ? ` ± ${fmtRate(r.rate.uncertainty)}` : '')
    ],
    [
      'Rate obtained',
      r.rate?.method === 'lifetimes'
        ? `from lifetimes: k = 1/τ − 1/τ_ref with τ = ${fmtRate(r.rate.lifetimeS)} s, τ_ref = ${fmtRate(r.rate.referenceLifetimeS)} s`
        : (r.rate?.method ?? 'direct')
    ],
    [
      'Rate as reported',
      r.rate?.original
        ? `${r.rate.original.value} ${unitLabel(r.rate.original.unit)}`
        : r.rate?.method === 'lifetimes' ? 'not reported: derived from the lifetimes' : 'in canonical units, as above'
    ],
    [
      'Driving force ΔG°',
      r.drivingForce
        ? `${sig(r.drivingForce.value)} eV`
        + (r.drivingForce.uncertainty ? ` ± ${sig(r.drivingForce.uncertainty, 2)}` : '')
        + ` (${r.drivingForce.method})`
        : '—'
    ],
    [
      'ΔG° as reported',
      r.drivingForce?.original
        ? `${r.drivingForce.original.value} ${unitLabel(r.drivingForce.original.unit)}`
        : 'in canonical units, as above'
    ],
    [
      'Redox inputs',
      r.drivingForce?.redox
        ? `E_ox = ${r.drivingForce.redox.donorOxidationPotential} V vs ${r.drivingForce.redox.donorReference}; E_red = `
        + `${r.drivingForce.redox.acceptorReductionPotential} V vs ${r.drivingForce.redox.acceptorReference}; E₀₀ = `
        + `${r.drivingForce.redox.excitationEnergy} eV`
        : '—'
    ],
    ['ΔG° derivation', derivation],
    [
      'Technique',
      label(r.technique?.method)
      + (r.technique?.excitationWavelengthNm ? `, excitation ${r.technique.excitationWavelengthNm} nm` : '')
      + (r.technique?.timeResolutionS ? `, time resolution ${fmtRate(r.technique.timeResolutionS)} s` : '')
    ],
    [
      'Reported parameters',
      r.reportedParameters
        ? Object.entries(r.reportedParameters)
            .map(([k, v]) => `${termSymbol(k)} = ${v} eV`)
            .join(', ')
        : '—'
    ],
    ['Where in the source', r.location ?? '—'],
    ['Notes', r.notes ?? '—']
  ]
}
