import Papa from 'papaparse'
import { describe, expect, it } from 'vitest'
import { csvFile, neutralizeCell } from '../../../../shared/records/csv'

describe('the one CSV writer (bundles and the Compare export)', () => {
  it('neutralises formula cells (= + - @ at the start: OWASP CSV injection guidance, from memory) and quotes per RFC 4180', () => {
    const text = csvFile(['kind', 'group', 'value'], [['point', '=HYPERLINK("http://evil.example")', -1.5], ['point', '@SUM(A1)', 2], ['point', 'plain, with "quotes"', 3]])
    // read back with a general-purpose CSV parser (papaparse)
    const rows = Papa.parse<string[]>(text.trim(), { newline: '\r\n' }).data
    expect(rows[0]).toEqual(['kind', 'group', 'value'])
    expect(rows[1]).toEqual(['point', '\'=HYPERLINK("http://evil.example")', '-1.5'])
    expect(rows[2]![1]).toBe('\'@SUM(A1)')
    expect(rows[3]![1]).toBe('plain, with "quotes"')
    expect(neutralizeCell(-1.5)).toBe(-1.5) // numbers stay numbers
  })
})
