/** Which records are the same system: names written differently merge, near misses stay apart. */
import { describe, expect, it } from 'vitest'
import { groupSystems, log10Sigma, normaliseName, type SystemMember } from '../../../../shared/records/systems'
import { dersimonianLaird } from '../../../../shared/stats/consensus'

let next = 1
const m = (over: Partial<SystemMember>): SystemMember => ({
  id: next++, labId: 1, labName: 'Lab A', datasetId: 1, doi: null, donor: { name: 'N,N-Dimethylaniline' }, acceptor: { name: 'C60' },
  bridge: null, linkage: 'bimolecular', process: 'charge-separation', medium: 'Acetonitrile', temperatureK: 298.15, log10Rate: 9.5, sigma: 0.1,
  ...over
})
const key = (identity: string, t: number) => `${identity}@${t}`

describe('system identity', () => {
  it('merges names written with other case, spacing and punctuation, synonyms, and records giving the same InChIKey', () => {
    expect(normaliseName('N,N-Dimethylaniline')).toBe(normaliseName('n,n dimethylaniline'))
    expect(normaliseName('Zinc porphyrin')).toBe(normaliseName('ZnP'))
    expect(normaliseName('MV2+')).not.toBe(normaliseName('MV')) // charges are kept
    const ik = 'JLTDJTHDQAWBAV-UHFFFAOYSA-N' // N,N-dimethylaniline (PubChem, from memory)
    const systems = groupSystems([
      m({ labId: 1, donor: { name: 'N,N-Dimethylaniline' } }),
      m({ labId: 2, donor: { name: 'n,n dimethylaniline' }, medium: 'acetonitrile', temperatureK: 296.5 }),
      m({ labId: 3, donor: { name: 'DMA', inchiKey: ik } }),
      m({ labId: 4, donor: { name: 'dimethylaniline (N,N-)', inchiKey: ik.toLowerCase() } })
    ], key)
    expect(systems.map(s => s.recordCount).sort()).toEqual([2, 2])
    expect(systems.every(s => s.labCount === 2)).toBe(true)
  })
  it('keeps apart another solvent, another process, and temperatures more than the ±2 K window apart', () => {
    const systems = groupSystems([
      m({ labId: 1 }),
      m({ labId: 2, medium: 'toluene' }),
      m({ labId: 3, process: 'charge-recombination' }),
      m({ labId: 4, temperatureK: 303.15 }), // 5 K apart
      m({ labId: 5, linkage: 'covalent' })
    ], key)
    expect(systems).toHaveLength(5)
    expect(systems.every(s => s.consensus === null)).toBe(true) // one lab each: no consensus
  })
  it('a consensus needs two labs; records without σ take their dataset\'s median σ and are marked', () => {
    const [s] = groupSystems([
      m({ labId: 1, datasetId: 1, log10Rate: 9.4, sigma: 0.1 }),
      m({ labId: 1, datasetId: 1, log10Rate: 9.6, sigma: 0.3 }),
      m({ labId: 2, datasetId: 2, log10Rate: 9.5, sigma: 0.2 }),
      m({ labId: 2, datasetId: 2, log10Rate: 9.55, sigma: null })
    ], key)
    expect(s!.labCount).toBe(2)
    const imputed = s!.records.find(r => r.sigma === null)!
    expect(imputed).toMatchObject({ sigmaUsed: 0.2, sigmaImputed: true })
    expect(s!.consensus!.log10Rate).toBe(dersimonianLaird([{ y: 9.4, sigma: 0.1 }, { y: 9.6, sigma: 0.3 }, { y: 9.5, sigma: 0.2 }, { y: 9.55, sigma: 0.2 }]).mean)
  })
  it('σ of log10 k from a rate uncertainty: σ/(k ln 10) (first-order propagation)', () => {
    expect(log10Sigma(1e9, 1e8)).toBeCloseTo(0.1 / Math.LN10, 12)
    expect(log10Sigma(1e9, null)).toBeNull()
  })
})
