import { describe, expect, it } from 'vitest'
import { bitsToHex, computeStructure, hexToWords, MORGAN, useRDKit } from '../../../../../server/utils/search/structures'
import { DEMO_SMILES } from '../../../../../scripts/lib/scenario'

describe('structures through RDKit', () => {
  it.each([
    // Standard InChIKeys as listed in PubChem for these compounds (from memory).
    ['benzene, Kekulé form', 'C1=CC=CC=C1', 'c1ccccc1', 'UHOVQNZJYSORNB-UHFFFAOYSA-N'],
    ['triethylamine', 'N(CC)(CC)CC', 'CCN(CC)CC', 'ZMANZCXQSJIPKH-UHFFFAOYSA-N'],
    ['ethanol', 'OCC', 'CCO', 'LFQSCWFLJHTTHZ-UHFFFAOYSA-N']
  ])('canonicalises %s and gives its standard InChIKey', async (_n, smiles, canonical, key) => {
    const s = computeStructure(await useRDKit(), smiles)
    expect(s.error).toBeNull()
    expect(s.canonicalSmiles).toBe(canonical)
    expect(s.inchiKey).toBe(key)
    expect(s.inchi).toMatch(/^InChI=1S\//)
    expect(s.svg).toMatch(/^<\?xml[\s\S]*<svg[\s\S]*<\/svg>\s*$/)
  })
  it('refuses what is not a structure, with a message', async () => {
    const rd = await useRDKit()
    for (const bad of ['C1CC', 'not a smiles', 'c1cccc1(', '']) expect(computeStructure(rd, bad).error, bad).toMatch(/SMILES|empty/)
  })
  it('every demo SMILES is a valid structure', async () => {
    const rd = await useRDKit()
    for (const [name, smiles] of Object.entries(DEMO_SMILES)) expect(computeStructure(rd, smiles).error, name).toBeNull()
  })
  it('stores the Morgan fingerprint losslessly: the words hold exactly the bits RDKit set', async () => {
    const rd = await useRDKit()
    const mol = rd.get_mol('CN(C)c1ccccc1')!
    const bits = mol.get_morgan_fp(JSON.stringify(MORGAN))
    mol.delete()
    expect(bits).toHaveLength(2048)
    const words = hexToWords(bitsToHex(bits))
    const on: number[] = []
    for (let i = 0; i < 2048; i++) if ((words[i >> 5]! >>> (i & 31)) & 1) on.push(i)
    expect(on).toEqual([...bits].flatMap((b, i) => b === '1' ? [i] : []))
    expect(on.length).toBeGreaterThan(5)
  })
})
