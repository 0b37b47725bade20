import { describe, expect, it } from 'vitest'
import { isValidDoi, isValidOrcid, mod112CheckChar, normalizeOrcid, orcidFromDigits } from '../../../shared/identifiers'

describe('ORCID iD check character (ISO 7064 MOD 11-2)', () => {
  // ORCID's documentation uses 0000-0002-1825-0097 as a valid iD and 0000-0001-5109-3700 as another (from memory);
  // ISO 7064 MOD 11-2 gives "X" for a remainder of 10, as in 0000-0002-1694-233X (ORCID support pages, from memory).
  it.each(['0000-0002-1825-0097', '0000-0001-5109-3700', '0000-0002-1694-233X', 'https://orcid.org/0000-0002-1825-0097'])('%s is valid', (id) => {
    expect(isValidOrcid(id)).toBe(true)
  })
  it.each(['0000-0002-1825-0098', '0000-0002-1825-009', '0000-0002-1825-00970', 'abcd-0002-1825-0097', ''])('%s is refused', (id) => {
    expect(isValidOrcid(id)).toBe(false)
  })
  it('computes the check character and builds demo iDs that pass', () => {
    expect(mod112CheckChar('000000021825009')).toBe('7')
    expect(isValidOrcid(orcidFromDigits('000000000010001'))).toBe(true)
    expect(normalizeOrcid(' https://orcid.org/0000-0002-1825-0097 ')).toBe('0000-0002-1825-0097')
  })
})

describe('DOI syntax (DOI Handbook: "10." registrant code "/" suffix)', () => {
  it.each(['10.1000/182', '10.99999/cp-demo.1.v2', 'https://doi.org/10.1000/182', 'doi:10.1038/nphys1170'])('%s is well-formed', (d) => {
    expect(isValidDoi(d)).toBe(true)
  })
  it.each(['11.1000/182', '10.1000', '10./x', '10.1000/', 'doi 10.1000/182'])('%s is refused', (d) => {
    expect(isValidDoi(d)).toBe(false)
  })
})
