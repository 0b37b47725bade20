/**
 * The invented demo scenario must not carry chemistry a practitioner spots at once as wrong.
 * Physical limits named with their source beside each check.
 */
import { describe, expect, it } from 'vitest'
import { DATASETS, demoRecords } from '../../../scripts/lib/scenario'
import { BOLTZMANN_J_PER_K, PLANCK_J_S, drivingForceByProcess } from '../../../shared/physics'

const all = DATASETS.flatMap(ds => [0, 1].flatMap(v => demoRecords(ds, v).map(r => ({ ds, r }))))

describe('demo scenario chemistry', () => {
  it('no unimolecular rate above the activationless ceiling k_BT/h (CODATA constants; the ceiling is transition-state theory, Eyring 1935)', () => {
    for (const { r } of all) if (r.rate.kind === 'unimolecular') expect(r.rate.value).toBeLessThanOrEqual(BOLTZMANN_J_PER_K * r.temperatureK / PLANCK_J_S)
  })
  it('acceptors called fullerenes are fullerenes; imides and non-fullerene acceptors are not', () => {
    for (const { r } of all) {
      const a = r.system.acceptor
      if (a.class === 'fullerene') expect(a.name).toMatch(/^(C60|C70|PC[67]1BM|C60-)/)
      if (/DI$|MI$|NFA/.test(a.name)) expect(a.class).not.toBe('fullerene')
    }
  })
  it('a bridge-length series: the distance follows the bridge (longer bridge, longer distance)', () => {
    const ds = DATASETS.find(d => d.key === 'demo-01')!
    const by = new Map<string, number[]>()
    for (const r of demoRecords(ds, 0)) {
      const list = by.get(r.system.bridge!.name) ?? []
      list.push(r.geometry!.centerToCenterAngstrom!)
      by.set(r.system.bridge!.name, list)
    }
    const max = (b: string) => Math.max(...by.get(b)!); const min = (b: string) => Math.min(...by.get(b)!)
    expect(max('phenylene')).toBeLessThan(min('biphenylene'))
    expect(max('biphenylene')).toBeLessThan(min('terphenylene'))
  })
  it('amines quenching the excited cationic iridium complexes: a charge shift within ±0.7 eV of thermoneutral, no neutral Ir(ppy)3', () => {
    // Reductive quenching of Ir(III)* by an amine makes Ir(II) and the amine radical cation; for the
    // cationic complexes named here it is mildly exergonic to mildly endergonic (from memory, approximate).
    const ds = DATASETS.find(d => d.key === 'demo-05')!
    for (const r of demoRecords(ds, 0)) {
      expect(r.process).toBe('charge-shift')
      expect(r.system.acceptor.name).not.toBe('Ir(ppy)3')
      expect(Math.abs(r.drivingForce!.value)).toBeLessThanOrEqual(0.7)
    }
  })
  it('a 77 K glass carries a glass permittivity, not the liquid\'s room-temperature one', () => {
    // a frozen solvent keeps little orientational polarization: ε_s near n² (from memory)
    for (const { r } of all) {
      if (r.temperatureK > 150) continue
      expect(r.medium.matrix).toMatch(/glass/)
      expect(r.medium.permittivity!).toBeLessThan(1.5 * r.medium.refractiveIndex! ** 2)
    }
  })
  it('no liquid-solvent record above the solvent\'s boiling point or below its melting point (handbook values, from memory)', () => {
    const liquidRange: Record<string, [number, number]> = {
      'tetrahydrofuran': [165, 339], '2-methyltetrahydrofuran': [137, 353], 'butyronitrile': [161, 390], 'benzonitrile': [260, 464],
      'toluene': [178, 383], 'acetonitrile': [228, 355], 'water': [273, 373], 'dichloromethane': [176, 313], 'N,N-dimethylformamide': [212, 426]
    }
    for (const { r } of all) {
      const range = r.medium.solvent ? liquidRange[r.medium.solvent] : undefined
      if (!range) continue
      expect(r.temperatureK, `${r.medium.solvent} at ${r.temperatureK} K`).toBeGreaterThan(range[0])
      expect(r.temperatureK, `${r.medium.solvent} at ${r.temperatureK} K`).toBeLessThan(range[1])
    }
  })
  it('every ΔG° from potentials equals the derivation for its process', () => {
    let n = 0
    for (const { r } of all) {
      const df = r.drivingForce
      if (df?.method !== 'redox-potentials') continue
      n++
      const d = drivingForceByProcess(r.process, { ...df.redox!, distance: r.geometry?.centerToCenterAngstrom, solventPermittivity: r.medium.permittivity! })
      expect(df.value).toBeCloseTo(d.deltaG, 3)
    }
    expect(n).toBeGreaterThan(100)
    expect(all.some(({ r }) => r.process === 'charge-recombination' && r.drivingForce?.method === 'redox-potentials')).toBe(true)
  })
})
