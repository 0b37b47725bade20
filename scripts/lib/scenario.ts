/**
 * The invented demo scenario: a fictional consortium of three labs, their people and a dozen
 * datasets whose records are generated from the semi-classical rate expression with noise.
 * Nothing here is real: names, labs and numbers are made up and every row is marked as demo data.
 */
import {
  BOLTZMANN_J_PER_K, diffusionLimit, drivingForceByProcess, energyFromEv, PLANCK_J_S, rehmWeller,
  semiclassicalLog10Rates, timeToSeconds
} from '../../shared/physics'
import { orcidFromDigits } from '../../shared/identifiers'
import type { DatasetMetadataV1, Linkage, ProcessKind, RateRecordV1, TechniqueMethod } from '../../shared/records/types'

export const DEMO_PASSWORD = 'crosspoint-demo'
export const DEMO_NOTE = 'DEMO DATA: invented values generated from the semi-classical model with noise; not a measurement.'

/** Small deterministic PRNG (mulberry32) so the scenario is the same on every machine. */
export function rng (seed: number) {
  let a = seed >>> 0
  const next = () => {
    a = (a + 0x6D2B79F5) >>> 0
    let t = a
    t = Math.imul(t ^ (t >>> 15), t | 1)
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61)
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296
  }
  const gauss = () => Math.sqrt(-2 * Math.log(next() + 1e-300)) * Math.cos(2 * Math.PI * next())
  const pick = <T>(xs: readonly T[]): T => xs[Math.floor(next() * xs.length)]!
  return { next, gauss, pick, between: (lo: number, hi: number) => lo + (hi - lo) * next() }
}

/** Solvent reference table (25 °C). Values are common handbook figures typed from memory. */
export const SOLVENTS = [
  { name: 'acetonitrile', permittivity: 35.94, refractiveIndex: 1.3442, viscosity: 0.341 },
  { name: 'benzonitrile', permittivity: 25.2, refractiveIndex: 1.5289, viscosity: 1.24 },
  { name: 'butyronitrile', permittivity: 24.3, refractiveIndex: 1.3838, viscosity: 0.55 },
  { name: 'dichloromethane', permittivity: 8.93, refractiveIndex: 1.4242, viscosity: 0.413 },
  { name: 'chloroform', permittivity: 4.81, refractiveIndex: 1.4459, viscosity: 0.537 },
  { name: 'tetrahydrofuran', permittivity: 7.58, refractiveIndex: 1.4072, viscosity: 0.46 },
  { name: '2-methyltetrahydrofuran', permittivity: 6.97, refractiveIndex: 1.406, viscosity: 0.46 },
  { name: 'toluene', permittivity: 2.38, refractiveIndex: 1.4961, viscosity: 0.56 },
  { name: 'cyclohexane', permittivity: 2.02, refractiveIndex: 1.4262, viscosity: 0.894 },
  { name: 'N,N-dimethylformamide', permittivity: 36.7, refractiveIndex: 1.4305, viscosity: 0.794 },
  { name: 'dimethyl sulfoxide', permittivity: 46.7, refractiveIndex: 1.4793, viscosity: 1.99 },
  { name: 'methanol', permittivity: 32.7, refractiveIndex: 1.3284, viscosity: 0.544 },
  { name: 'ethanol', permittivity: 24.5, refractiveIndex: 1.3611, viscosity: 1.074 },
  { name: 'water', permittivity: 78.36, refractiveIndex: 1.333, viscosity: 0.89 }
].map(s => ({ ...s, temperatureK: 298.15, source: 'handbook value, from memory' }))

export const LABS = [
  { slug: 'faulkwood-ultrafast', name: 'Faulkwood Ultrafast Lab', institution: 'Brightwater Institute of Technology (fictional)' },
  { slug: 'orrel-solar-fuels', name: 'Orrel Solar-Fuels Group', institution: 'University of Lindqvale (fictional)' },
  { slug: 'delacombe-bio-et', name: 'Delacombe Bio-ET Lab', institution: 'Marrowfield College (fictional)' }
]

export const PEOPLE = [
  { email: 'imre.faulkwood@brightwater.example', name: 'Imre Faulkwood', role: 'contributor', lab: 'faulkwood-ultrafast', lead: true, orcid: orcidFromDigits('000000000010001') },
  { email: 'sunniva.orrel@lindqvale.example', name: 'Sunniva Orrel', role: 'contributor', lab: 'orrel-solar-fuels', lead: true, orcid: orcidFromDigits('000000000010002') },
  { email: 'kasimir.delacombe@marrowfield.example', name: 'Kasimir Delacombe', role: 'contributor', lab: 'delacombe-bio-et', lead: true, orcid: orcidFromDigits('000000000010003') },
  { email: 'pia.veldhaus@brightwater.example', name: 'Pia Veldhaus', role: 'curator', lab: 'faulkwood-ultrafast', lead: false, orcid: orcidFromDigits('000000000010004') },
  // a second curator in another lab, so that every lab's submissions have someone who may review them
  { email: 'ansel.moravec@lindqvale.example', name: 'Ansel Moravec', role: 'curator', lab: 'orrel-solar-fuels', lead: false, orcid: orcidFromDigits('000000000010005') },
  { email: 'rowan.tessaly@crosspoint.example', name: 'Rowan Tessaly', role: 'admin', lab: null, lead: false, orcid: null }
] as const

/**
 * SMILES of the demo species that are ordinary, well-defined molecules (written from memory; RDKit
 * reads every one, see tests/unit/server/structures.test.ts). Labels such as "ZnP" or "Cu(I) site"
 * stand for assemblies a record would not draw, and get none, as many real records would.
 */
export const DEMO_SMILES: Record<string, string> = {
  'triethylamine': 'CCN(CC)CC',
  'DABCO': 'C1CN2CCN1CC2',
  'N,N-dimethylaniline': 'CN(C)c1ccccc1',
  'tri-p-tolylamine': 'Cc1ccc(cc1)N(c1ccc(C)cc1)c1ccc(C)cc1',
  'MV2+': 'C[n+]1ccc(cc1)-c1cc[n+](C)cc1',
  'BV2+': 'C(c1ccccc1)[n+]1ccc(cc1)-c1cc[n+](Cc2ccccc2)cc1',
  'Acr+': 'C[n+]1c2ccccc2cc2ccccc12',
  'mesityl': 'Cc1cc(C)cc(C)c1',
  'durene': 'Cc1cc(C)c(C)cc1C',
  'xylyl': 'Cc1ccc(C)cc1',
  'dimethoxynaphthalene': 'COc1ccc2cc(OC)ccc2c1',
  'dicyanovinyl': 'C=C(C#N)C#N'
}

interface Family {
  donors: string[]; acceptors: string[]; bridges?: string[]; classes: [string, string]
  /** Class of particular acceptors where it differs from classes[1]. */
  acceptorClasses?: Record<string, string>
  /** Centre-to-centre distance (Å) each bridge sets; without it the distance is drawn from `distances`. */
  bridgeDistances?: Record<string, number>
  /** A frozen glass below its glass transition: its own static permittivity and refractive index. */
  glass?: { name: string, permittivity: number, refractiveIndex: number }
  linkage: Linkage; process: ProcessKind; initialState: 'singlet' | 'triplet' | 'thermal'
  solvents: string[]; technique: TechniqueMethod; excitationNm?: number
  lambdaSolvent: number; lambdaInternal: number; vibrationEnergy: number; coupling: number
  dgRange: [number, number]; temperatures: number[]; distances?: [number, number]; beta?: number
  bimolecular?: boolean; noise: number; count: number
}

export interface DemoDataset {
  key: string
  lab: string
  /** States of each version, oldest first. */
  versions: ('draft' | 'submitted' | 'returned' | 'published' | 'withdrawn')[]
  title: string
  description: string
  keywords: string[]
  license: string
  family: Family
  returnComment?: string
  /** records made otherwise than by drawing from the family (the interlaboratory study) */
  make?: (versionIndex: number) => RateRecordV1[]
}

const porph: Family = {
  donors: ['ZnP', 'ZnP-tBu', 'H2P'], acceptors: ['C60', 'C60-pyrrolidine', 'C70'], bridges: ['phenylene', 'biphenylene', 'terphenylene'],
  // each added phenylene adds about 4.3 Å (from memory); the distance follows the bridge, not chance
  bridgeDistances: { phenylene: 11.6, biphenylene: 15.9, terphenylene: 20.2 },
  classes: ['porphyrin', 'fullerene'], linkage: 'covalent', process: 'charge-separation', initialState: 'singlet',
  solvents: ['benzonitrile', 'toluene', 'tetrahydrofuran'], technique: 'transient-absorption', excitationNm: 420,
  lambdaSolvent: 0.55, lambdaInternal: 0.25, vibrationEnergy: 0.18, coupling: 0.004, dgRange: [-1.6, -0.1],
  temperatures: [298.15], distances: [8, 22], beta: 0.35, noise: 0.12, count: 260
}

export const DATASETS: DemoDataset[] = [
  { key: 'demo-01', lab: 'faulkwood-ultrafast', versions: ['published', 'published'], title: 'Bridge-length series of porphyrin–fullerene dyads (demo)',
    description: 'Charge separation across oligophenylene bridges of increasing length. ' + DEMO_NOTE, keywords: ['distance dependence', 'porphyrin', 'fullerene'], license: 'CC-BY-4.0',
    family: { ...porph, count: 180 } },
  { key: 'demo-02', lab: 'faulkwood-ultrafast', versions: ['published'], title: 'Driving-force series of porphyrin–imide dyads in three solvents (demo)',
    description: 'Normal and inverted regions sampled by varying donor and acceptor substituents. ' + DEMO_NOTE, keywords: ['inverted region', 'imide'], license: 'CC-BY-4.0',
    family: { ...porph, acceptors: ['NDI', 'PDI', 'PMI', 'NMI'], classes: ['porphyrin', 'imide'], bridges: undefined, bridgeDistances: undefined, dgRange: [-2.3, 0.1], distances: [11, 13], count: 520, lambdaSolvent: 0.7, lambdaInternal: 0.4, vibrationEnergy: 0.186 } },
  { key: 'demo-03', lab: 'faulkwood-ultrafast', versions: ['draft'], title: 'Charge recombination in a 2-methyltetrahydrofuran glass at 77 K (demo)',
    description: 'Recombination of the radical-ion pair in frozen solvent. ' + DEMO_NOTE, keywords: ['low temperature', 'recombination'], license: 'CC-BY-4.0',
    family: { ...porph, process: 'charge-recombination', initialState: 'thermal', solvents: ['2-methyltetrahydrofuran'], temperatures: [77], dgRange: [-2.0, -0.8], count: 90, lambdaSolvent: 0.35,
      // below its glass transition the solvent's dipoles are frozen: ε_s falls toward n² (values from memory, approximate)
      glass: { name: '2-methyltetrahydrofuran glass', permittivity: 2.6, refractiveIndex: 1.43 } } },
  { key: 'demo-04', lab: 'faulkwood-ultrafast', versions: ['submitted'], title: 'Triplet-state charge separation in zinc chlorin dyads (demo)',
    description: 'Slow triplet channel measured by nanosecond flash photolysis. ' + DEMO_NOTE, keywords: ['triplet', 'chlorin'], license: 'CC0-1.0',
    family: { ...porph, donors: ['ZnChl', 'ZnChl-Me'], classes: ['chlorin', 'imide'], acceptors: ['NDI', 'PMI'], bridges: undefined, bridgeDistances: undefined, distances: [10, 14], initialState: 'triplet', dgRange: [-0.9, -0.1], count: 140, coupling: 0.0008 } },
  { key: 'demo-05', lab: 'orrel-solar-fuels', versions: ['published'], title: 'Reductive quenching of cationic iridium photosensitizers by amine donors (demo)',
    description: 'Stern–Volmer quenching constants of the excited Ir(III) complexes by amines (the amine is oxidised, the complex reduced); the most exergonic approach the diffusion limit. ' + DEMO_NOTE, keywords: ['photoredox', 'quenching', 'diffusion limit'], license: 'CC-BY-4.0',
    family: { donors: ['triethylamine', 'DABCO', 'N,N-dimethylaniline', 'tri-p-tolylamine'], acceptors: ['Ir(ppy)2(dtbbpy)+', 'Ir(dF(CF3)ppy)2(dtbbpy)+'], classes: ['amine', 'iridium complex'],
      linkage: 'bimolecular', process: 'charge-shift', initialState: 'triplet', solvents: ['acetonitrile', 'N,N-dimethylformamide', 'dichloromethane'], technique: 'steady-state-quenching', excitationNm: 450,
      lambdaSolvent: 0.8, lambdaInternal: 0.2, vibrationEnergy: 0.17, coupling: 0.01, dgRange: [-0.65, 0.25], temperatures: [298.15], bimolecular: true, noise: 0.1, count: 300 } },
  { key: 'demo-06', lab: 'orrel-solar-fuels', versions: ['published', 'submitted'], title: 'Ruthenium polypyridyl sensitizers with viologen acceptors (demo)',
    description: 'Intramolecular electron transfer in linked Ru–viologen assemblies. ' + DEMO_NOTE, keywords: ['ruthenium', 'viologen', 'solar fuels'], license: 'CC-BY-4.0',
    family: { donors: ['Ru(bpy)3-C2', 'Ru(dmb)3-C2', 'Ru(phen)3-C2'], acceptors: ['MV2+', 'BV2+'], classes: ['ruthenium complex', 'viologen'], linkage: 'covalent', process: 'charge-separation', initialState: 'triplet',
      solvents: ['acetonitrile', 'water'], technique: 'transient-absorption', excitationNm: 460, lambdaSolvent: 0.9, lambdaInternal: 0.3, vibrationEnergy: 0.16, coupling: 0.003,
      dgRange: [-1.1, -0.05], temperatures: [298.15], distances: [9, 14], noise: 0.15, count: 240 } },
  { key: 'demo-07', lab: 'orrel-solar-fuels', versions: ['returned'], title: 'Charge shift in acridinium–arene dyads (demo)',
    description: 'Charge shift from the arene to the excited acridinium. ' + DEMO_NOTE, keywords: ['acridinium', 'charge shift'], license: 'CC-BY-4.0',
    returnComment: 'Please state the reference electrode for the potentials in rows 3–10 and check the two rates flagged below.',
    family: { donors: ['mesityl', 'durene', 'xylyl'], acceptors: ['Acr+'], classes: ['arene', 'acridinium'], linkage: 'covalent', process: 'charge-shift', initialState: 'singlet',
      solvents: ['acetonitrile', 'benzonitrile'], technique: 'upconversion', excitationNm: 400, lambdaSolvent: 0.4, lambdaInternal: 0.25, vibrationEnergy: 0.18, coupling: 0.02,
      dgRange: [-0.7, 0.05], temperatures: [298.15], distances: [5, 6], noise: 0.12, count: 60 } },
  { key: 'demo-08', lab: 'orrel-solar-fuels', versions: ['draft'], title: 'Hole transfer in polymer–fullerene blend films (demo)',
    description: 'Hole transfer from fullerene anion to donor polymer in films. ' + DEMO_NOTE, keywords: ['organic photovoltaics', 'films'], license: 'CC-BY-4.0',
    family: { donors: ['PBT-x polymer', 'PTV-y polymer'], acceptors: ['PC71BM', 'ITIC-like NFA'], classes: ['polymer', 'fullerene'], acceptorClasses: { 'ITIC-like NFA': 'non-fullerene acceptor' }, linkage: 'other', process: 'hole-transfer', initialState: 'singlet',
      solvents: ['film'], technique: 'microwave-conductivity', excitationNm: 600, lambdaSolvent: 0.2, lambdaInternal: 0.15, vibrationEnergy: 0.17, coupling: 0.008,
      dgRange: [-0.6, -0.05], temperatures: [298.15], noise: 0.2, count: 80 } },
  { key: 'demo-09', lab: 'delacombe-bio-et', versions: ['published'], title: 'Ruthenium-labelled blue copper protein series (demo)',
    description: 'Distance decay of Cu(I) → Ru(III) electron transfer in labelled protein variants. ' + DEMO_NOTE, keywords: ['protein', 'tunnelling', 'distance dependence'], license: 'CC0-1.0',
    family: { donors: ['Cu(I) site'], acceptors: ['Ru(bpy)2(im)(His)3+'], bridges: ['β-strand', 'α-helix'], classes: ['copper protein', 'ruthenium complex'], linkage: 'protein', process: 'charge-separation', initialState: 'thermal',
      solvents: ['water'], technique: 'transient-absorption', excitationNm: 480, lambdaSolvent: 0.6, lambdaInternal: 0.2, vibrationEnergy: 0.15, coupling: 0.02,
      dgRange: [-0.8, -0.6], temperatures: [298.15], distances: [12, 26], beta: 1.1, noise: 0.15, count: 220 } },
  { key: 'demo-10', lab: 'delacombe-bio-et', versions: ['withdrawn'], title: 'Cytochrome-like heme protein pairs (demo, withdrawn)',
    description: 'Interprotein electron transfer; withdrawn after a calibration error was found. ' + DEMO_NOTE, keywords: ['heme', 'protein complex'], license: 'CC-BY-4.0',
    family: { donors: ['Zn-heme'], acceptors: ['Fe(III)-heme'], classes: ['heme', 'heme'], linkage: 'protein', process: 'charge-separation', initialState: 'triplet',
      solvents: ['water'], technique: 'transient-absorption', excitationNm: 415, lambdaSolvent: 0.9, lambdaInternal: 0.3, vibrationEnergy: 0.15, coupling: 0.0005,
      dgRange: [-1.0, -0.4], temperatures: [298.15], distances: [15, 20], noise: 0.2, count: 70 } },
  { key: 'demo-11', lab: 'delacombe-bio-et', versions: ['submitted'], title: 'Tryptophan-mediated hopping in labelled azurin variants (demo)',
    description: 'Multistep hole transfer assisted by an intervening tryptophan. ' + DEMO_NOTE, keywords: ['hopping', 'tryptophan'], license: 'CC-BY-4.0',
    family: { donors: ['Cu(I) site'], acceptors: ['Re(CO)3(dmp)(His)+'], bridges: ['Trp'], classes: ['copper protein', 'rhenium complex'], linkage: 'protein', process: 'hole-transfer', initialState: 'triplet',
      solvents: ['water'], technique: 'tcspc', excitationNm: 400, lambdaSolvent: 0.7, lambdaInternal: 0.2, vibrationEnergy: 0.15, coupling: 0.003,
      dgRange: [-0.5, 0.1], temperatures: [298.15], distances: [16, 20], noise: 0.15, count: 110 } },
  { key: 'demo-12', lab: 'delacombe-bio-et', versions: ['published'], title: 'Temperature series of a rigid donor–bridge–acceptor molecule, 200–340 K (demo)',
    description: 'Rates at fixed driving force from 200 to 340 K for Arrhenius and Marcus analyses. ' + DEMO_NOTE, keywords: ['temperature dependence', 'activation'], license: 'CC-BY-4.0',
    family: { donors: ['dimethoxynaphthalene'], acceptors: ['dicyanovinyl'], bridges: ['norbornylogous bridge'], classes: ['naphthalene', 'nitrile'], linkage: 'covalent', process: 'charge-separation', initialState: 'singlet',
      solvents: ['butyronitrile', '2-methyltetrahydrofuran'], technique: 'tcspc', excitationNm: 320, lambdaSolvent: 0.8, lambdaInternal: 0.3, vibrationEnergy: 0.18, coupling: 0.002,
      dgRange: [-0.45, -0.25], temperatures: [200, 220, 240, 260, 280, 298.15, 320, 340], distances: [10, 11], noise: 0.08, count: 200 } }
]

/**
 * An invented interlaboratory study: three labs each measure the same four dyads twice (same donor, acceptor, bridge,
 * solvent, 298.15 K, one fixed ΔG° per dyad); one lab's value for one dyad is 40× too high, so the archive's
 * consensus flags it. Values from the semi-classical model with noise, like the rest of the demo.
 */
const INTERLAB_SYSTEMS = [
  { donor: 'ZnP', acceptor: 'NDI', solvent: 'toluene', dg: -0.62 },
  { donor: 'ZnP', acceptor: 'NDI', solvent: 'benzonitrile', dg: -0.91 },
  { donor: 'H2P', acceptor: 'NDI', solvent: 'toluene', dg: -0.48 },
  { donor: 'H2P', acceptor: 'NDI', solvent: 'benzonitrile', dg: -0.77 }
]
export const INTERLAB_OUTLIER = { lab: 'delacombe-bio-et', system: 3, log10Offset: Math.log10(40) }
function interlabRecords (lab: string, labNo: number): RateRecordV1[] {
  const r = rng(7700 + labNo)
  const out: RateRecordV1[] = []
  INTERLAB_SYSTEMS.forEach((sys, si) => {
    const solvent = SOLVENTS.find(x => x.name === sys.solvent)!
    const pekar = 1 / solvent.refractiveIndex ** 2 - 1 / solvent.permittivity
    const ls = 0.7 * (0.35 + 0.65 * pekar / 0.5282)
    const model = semiclassicalLog10Rates([sys.dg], { lambdaSolvent: ls, lambdaInternal: 0.3, vibrationEnergy: 0.18, coupling: 0.003, temperatureK: 298.15 }).log10Rate[0]!
    for (let rep = 0; rep < 2; rep++) {
      const off = lab === INTERLAB_OUTLIER.lab && si === INTERLAB_OUTLIER.system ? INTERLAB_OUTLIER.log10Offset : 0
      const k = 10 ** (model + off + 0.06 * r.gauss())
      out.push({
        system: { donor: { name: sys.donor, class: 'porphyrin' }, acceptor: { name: sys.acceptor, class: 'imide' }, bridge: { name: 'xylylene' }, linkage: 'covalent' },
        process: 'charge-separation',
        initialState: 'singlet',
        medium: { solvent: solvent.name, permittivity: solvent.permittivity, refractiveIndex: solvent.refractiveIndex },
        temperatureK: 298.15,
        geometry: { centerToCenterAngstrom: 12.4 },
        rate: { value: sig(k, 4), uncertainty: sig(k * (10 ** 0.06 - 1), 2), kind: 'unimolecular', method: 'direct' },
        drivingForce: { value: sys.dg, uncertainty: 0.05, method: 'estimated' },
        technique: { method: 'transient-absorption', excitationWavelengthNm: 560 },
        notes: DEMO_NOTE,
        location: `demo round-robin, dyad ${si + 1}, replicate ${rep + 1}`
      })
    }
  })
  return out
}
const INTERLAB_LABS = ['faulkwood-ultrafast', 'orrel-solar-fuels', 'delacombe-bio-et']
DATASETS.push(...INTERLAB_LABS.map((lab, i): DemoDataset => ({
  key: `demo-${21 + i}`,
  lab,
  versions: ['published'],
  title: `Round-robin of four porphyrin–imide dyads, ${['first', 'second', 'third'][i]} lab (demo)`,
  description: 'The same four xylylene-bridged dyads measured in toluene and benzonitrile at 298.15 K, two replicates each, '
    + 'as part of an invented interlaboratory comparison. ' + DEMO_NOTE,
  keywords: ['interlaboratory comparison', 'porphyrin', 'imide'],
  license: 'CC-BY-4.0',
  family: porph,
  make: () => interlabRecords(lab, i)
})))

/** The records of one demo dataset version (a later version re-draws noise and adds points). */
export function demoRecords (ds: DemoDataset, versionIndex: number): RateRecordV1[] {
  if (ds.make) return ds.make(versionIndex)
  const seed = Number(ds.key.replace(/\D/g, '')) * 1000 + versionIndex
  const r = rng(seed)
  const f = ds.family
  const count = f.count + versionIndex * 20
  const out: RateRecordV1[] = []
  for (let i = 0; i < count; i++) {
    const solventName = r.pick(f.solvents)
    const solvent = SOLVENTS.find(s => s.name === solventName)
    const T = r.pick(f.temperatures)
    const dg = f.dgRange[0] + (f.dgRange[1] - f.dgRange[0]) * r.next()
    const bridge = f.bridges ? r.pick(f.bridges) : undefined
    const R = bridge && f.bridgeDistances
      ? f.bridgeDistances[bridge]! + 0.4 * (r.next() - 0.5)
      : f.distances ? f.distances[0] + (f.distances[1] - f.distances[0]) * r.next() : undefined
    const R0 = f.bridgeDistances ? Math.min(...Object.values(f.bridgeDistances)) : f.distances?.[0]
    let V = f.coupling
    if (f.beta && R !== undefined && R0 !== undefined) V *= Math.exp(-f.beta * (R - R0) / 2)
    // Solvent polarity moves λ_s with the Pekar factor relative to acetonitrile's 0.5282.
    const medium = f.glass ?? solvent
    const pekar = medium ? 1 / medium.refractiveIndex ** 2 - 1 / medium.permittivity : 0.3
    const ls = Math.max(0.08, f.lambdaSolvent * (0.35 + 0.65 * pekar / 0.5282))
    const model = semiclassicalLog10Rates([dg], { lambdaSolvent: ls, lambdaInternal: f.lambdaInternal, vibrationEnergy: f.vibrationEnergy, coupling: V, temperatureK: T }).log10Rate[0]!
    // A non-adiabatic rate stays below the activationless ceiling k_BT/h: noise is drawn again above it.
    const ceiling = Math.log10(0.5 * BOLTZMANN_J_PER_K * T / PLANCK_J_S)
    let log10k = model + f.noise * r.gauss()
    for (let tries = 0; log10k > ceiling && tries < 20; tries++) log10k = model + f.noise * r.gauss()
    log10k = Math.min(log10k, ceiling)
    let kind: 'unimolecular' | 'bimolecular' = 'unimolecular'
    if (f.bimolecular) {
      // k_q = k_diff k_act / (k_diff + k_act) with an invented encounter constant of 0.5 M⁻¹.
      const kd = diffusionLimit((solvent?.viscosity ?? 0.5) * 1e-3, T)
      const kact = 0.5 * 10 ** log10k
      log10k = Math.log10(kd * kact / (kd + kact))
      kind = 'bimolecular'
    }
    const k = 10 ** log10k
    const donor = r.pick(f.donors); const acceptor = r.pick(f.acceptors)
    const rec: RateRecordV1 = {
      system: {
        donor: { name: donor, class: f.classes[0], ...(DEMO_SMILES[donor] ? { smiles: DEMO_SMILES[donor] } : {}) },
        acceptor: { name: acceptor, class: f.acceptorClasses?.[acceptor] ?? f.classes[1], ...(DEMO_SMILES[acceptor] ? { smiles: DEMO_SMILES[acceptor] } : {}) },
        ...(bridge ? { bridge: { name: bridge } } : {}),
        linkage: f.linkage
      },
      process: f.process,
      initialState: f.initialState,
      medium: f.glass
        ? { matrix: f.glass.name, permittivity: f.glass.permittivity, refractiveIndex: f.glass.refractiveIndex }
        : solvent
          ? { solvent: solvent.name, permittivity: solvent.permittivity, refractiveIndex: solvent.refractiveIndex }
          : { matrix: 'spin-coated film' },
      temperatureK: T,
      ...(R !== undefined ? { geometry: { centerToCenterAngstrom: round(R, 2) } } : {}),
      rate: { value: sig(k, 4), uncertainty: sig(k * (10 ** f.noise - 1), 2), kind, method: 'direct' },
      drivingForce: { value: round(dg, 3), uncertainty: 0.05, method: 'estimated' },
      reportedParameters: i % 7 === 0 ? { lambdaSolvent: round(ls, 2), lambdaInternal: f.lambdaInternal, vibrationEnergy: f.vibrationEnergy } : undefined,
      technique: { method: f.technique, ...(f.excitationNm ? { excitationWavelengthNm: f.excitationNm } : {}) },
      notes: DEMO_NOTE,
      location: `demo table ${1 + (i % 3)}, row ${i + 1}`
    }
    if (!rec.reportedParameters) delete rec.reportedParameters
    // Every fourth record: the driving force came from (invented) potentials, derived by process
    // (Rehm–Weller for charge separation, −(ΔG°_CS + E₀₀) for recombination, no ion-pair term for a charge shift).
    const eps = f.glass?.permittivity ?? solvent?.permittivity
    if (i % 4 === 1 && eps !== undefined && R !== undefined && f.process !== 'other' && (f.initialState !== 'thermal' || f.process === 'charge-recombination')) {
      const e00 = f.process === 'charge-recombination' ? 0 : round(2.0 + 0.3 * r.next(), 3)
      const eOx = round(0.6 + 0.6 * r.next(), 3)
      const coulomb = rehmWeller({ donorOxidationPotential: 0, donorReference: 'SCE', acceptorReductionPotential: 0, acceptorReference: 'SCE', excitationEnergy: 0, distance: round(R, 2), solventPermittivity: eps }).terms.coulomb
      // invert the process's formula for E_red so that the derivation gives the drawn ΔG°
      const eRed = round(f.process === 'charge-separation'
        ? eOx - e00 + coulomb - dg
        : f.process === 'charge-recombination'
          ? eOx + coulomb + dg
          : eOx - e00 - dg, 3)
      const redox = { donorOxidationPotential: eOx, donorReference: 'SCE', acceptorReductionPotential: eRed, acceptorReference: 'SCE', excitationEnergy: e00 }
      const d = drivingForceByProcess(f.process, { ...redox, distance: round(R, 2), solventPermittivity: eps })
      rec.drivingForce = { value: round(d.deltaG, 4), uncertainty: 0.08, method: 'redox-potentials', redox }
    }
    // Every fifth unimolecular record: the rate was derived from lifetimes with and without acceptor.
    if (i % 5 === 2 && kind === 'unimolecular' && k < 5e11 && k > 1e5) {
      const tauRefNs = 2 + 8 * r.next()
      const tauRef = timeToSeconds(tauRefNs, 'ns')
      const tau = 1 / (k + 1 / tauRef)
      rec.rate = { ...rec.rate, method: 'lifetimes', lifetimeS: sig(tau, 5), referenceLifetimeS: sig(tauRef, 5), value: sig(1 / sig(tau, 5) - 1 / sig(tauRef, 5), 6) }
    }
    // Some values were reported in other units; keep what was reported.
    if (i % 6 === 3) rec.rate.original = { value: sig(rec.rate.value / 1e9, 4), unit: 'ns-1' }
    if (i % 6 === 4 && rec.drivingForce) rec.drivingForce.original = { value: round(energyFromEv(rec.drivingForce.value, 'kJ/mol'), 2), unit: 'kJ/mol' }
    out.push(rec)
  }
  return out
}

export function demoMetadata (ds: DemoDataset, creators: { name: string, orcid?: string | null, affiliation?: string }[]): DatasetMetadataV1 {
  return {
    title: ds.title,
    description: ds.description,
    // the invented people each have one given and one family name ("Imre Faulkwood")
    creators: creators.map((c) => {
      const [givenName, familyName] = c.name.split(' ') as [string, string]
      return {
        name: `${familyName}, ${givenName}`, nameType: 'Personal' as const, familyName, givenName,
        ...(c.orcid ? { orcid: c.orcid } : {}), ...(c.affiliation ? { affiliation: c.affiliation } : {})
      }
    }),
    keywords: [...ds.keywords, 'demo data'],
    license: ds.license,
    funding: [{ funderName: 'Meridian Charge-Transfer Consortium (fictional)', awardNumber: `MCT-${ds.key.toUpperCase()}` }],
    // an invented article DOI under the test prefix 10.99999 (not registered anywhere)
    relatedIdentifiers: [{ identifier: `10.99999/demo-article.${ds.key}`, identifierType: 'DOI', relationType: 'IsSupplementTo' }]
  }
}

function round (v: number, d: number): number { const m = 10 ** d; return Math.round(v * m) / m }
function sig (v: number, d: number): number { return Number(v.toPrecision(d)) }
