/**
 * One vocabulary for people: each model parameter and record quantity by its symbol, its name in words and its
 * unit, as forms, tables, messages, plots and exports show it. Field names of the open format stay in the API
 * and the files; screens use these.
 */
export interface Term { symbol: string, name: string, unit: string }

export const TERMS = {
  lambdaSolvent: { symbol: 'λ_s', name: 'solvent reorganization energy', unit: 'eV' },
  lambdaInternal: { symbol: 'λ_i', name: 'internal reorganization energy', unit: 'eV' },
  lambdaTotal: { symbol: 'λ', name: 'total reorganization energy', unit: 'eV' },
  vibrationEnergy: { symbol: 'ħω', name: 'quantum mode energy', unit: 'eV' },
  coupling: { symbol: 'V', name: 'electronic coupling', unit: 'eV' },
  temperatureK: { symbol: 'T', name: 'temperature', unit: 'K' },
  deltaG: { symbol: 'ΔG°', name: 'driving force', unit: 'eV' },
  log10Rate: { symbol: 'log₁₀ k', name: 'rate constant (log)', unit: 'log₁₀ s⁻¹' },
  distance: { symbol: 'R', name: 'donor–acceptor distance', unit: 'Å' }
} satisfies Record<string, Term>
export type TermKey = keyof typeof TERMS

/** "λ_s (eV)" — the symbol with its unit, for table headers and axis labels. */
export function termHeader (key: string): string {
  const t = (TERMS as Record<string, Term>)[key]
  return t ? `${t.symbol} (${t.unit})` : key
}
/** "λ_s, solvent reorganization energy" — for labels where there is room. */
export function termLabel (key: string): string {
  const t = (TERMS as Record<string, Term>)[key]
  return t ? `${t.symbol}, ${t.name}` : key
}
/** "λ_s" — the symbol alone. */
export function termSymbol (key: string): string {
  return (TERMS as Record<string, Term>)[key]?.symbol ?? key
}

/** Each column of the flat record view (templates, uploads, the entry form) in words, for people. */
export const COLUMN_LABELS: Record<string, string> = {
  donor_name: 'Donor', donor_class: 'Donor class', donor_smiles: 'Donor SMILES',
  acceptor_name: 'Acceptor', acceptor_class: 'Acceptor class', acceptor_smiles: 'Acceptor SMILES',
  bridge_name: 'Bridge', linkage: 'Linkage', process: 'Process', initial_state: 'Initial state',
  solvent: 'Solvent', permittivity: 'Permittivity ε_s', refractive_index: 'Refractive index n', matrix: 'Matrix',
  temperature: 'Temperature T', distance_cc: 'Distance R (centre to centre)', distance_ee: 'Distance (edge to edge)',
  rate: 'Rate constant k', rate_uncertainty: 'Uncertainty of k (1σ)', lifetime: 'Lifetime τ with acceptor',
  reference_lifetime: 'Reference lifetime τ_ref', delta_g: 'Driving force ΔG°', delta_g_uncertainty: 'Uncertainty of ΔG° (1σ)',
  delta_g_method: 'How ΔG° was obtained', donor_oxidation_potential: 'Donor oxidation potential E_ox',
  donor_reference: 'Reference electrode of E_ox', acceptor_reduction_potential: 'Acceptor reduction potential E_red',
  acceptor_reference: 'Reference electrode of E_red', reference_offset: 'Offset between the electrodes',
  excitation_energy: 'Excitation energy E₀₀', lambda_solvent: 'Reported λ_s', lambda_internal: 'Reported λ_i',
  coupling: 'Reported coupling V', vibration_energy: 'Reported ħω', technique: 'Technique',
  excitation_wavelength: 'Excitation wavelength', time_resolution: 'Time resolution', notes: 'Notes',
  location: 'Where in the article'
}
export function columnLabel (key: string): string {
  return COLUMN_LABELS[key] ?? key.replace(/_/g, ' ')
}

const UNIT_LABELS: Record<string, string> = {
  'cm-1': 'cm⁻¹', 'degC': '°C', 'angstrom': 'Å', 'us': 'µs', 's-1': 's⁻¹', 'ms-1': 'ms⁻¹', 'us-1': 'µs⁻¹',
  'ns-1': 'ns⁻¹', 'ps-1': 'ps⁻¹', 'M-1 s-1': 'M⁻¹ s⁻¹', 'M-1 ns-1': 'M⁻¹ ns⁻¹', 'cm3 molecule-1 s-1': 'cm³ molecule⁻¹ s⁻¹'
}
/** A unit as printed ("s⁻¹", "Å", "°C"); the files and the API keep the ASCII codes ("s-1", "angstrom", "degC"). */
export function unitLabel (code: string | undefined): string {
  return code === undefined ? '' : UNIT_LABELS[code] ?? code
}

/** "1 record", "2 records", "1,372 records": a count with its noun in the right number (screens and messages alike). */
export function countOf (n: number, one: string, many = `${one}s`): string {
  return `${n.toLocaleString('en')} ${n === 1 ? one : many}`
}

/** Plain-language labels for the format's enumerations. */
export const PROCESS_LABELS: Record<string, string> = {
  'charge-separation': 'charge separation',
  'charge-recombination': 'charge recombination',
  'charge-shift': 'charge shift',
  'hole-transfer': 'hole transfer',
  'other': 'other'
}
export const TECHNIQUE_LABELS: Record<string, string> = {
  'transient-absorption': 'transient absorption',
  'tcspc': 'time-correlated photon counting',
  'upconversion': 'fluorescence upconversion',
  'streak-camera': 'streak camera',
  'pulse-radiolysis': 'pulse radiolysis',
  'microwave-conductivity': 'microwave conductivity',
  'steady-state-quenching': 'steady-state quenching',
  'other': 'other'
}
