import { describe, expect, it } from 'vitest'
import { ariaSortOf, cellText, nextSort, type Col } from '../../../../app/utils/table'
import { parsePoints } from '../../../../app/utils/points'
import { apiProblem } from '../../../../app/utils/api-problem'

describe('table columns (app/utils/table.ts)', () => {
  type R = { id: number, name: string | null, k: number }
  const rows: R[] = [{ id: 1, name: null, k: 2.5 }]
  it('shows the formatter first, then the value, and an em dash for nothing', () => {
    expect(cellText<R>({ id: 'name', header: 'Name' }, rows[0]!)).toBe('—')
    expect(cellText<R>({ id: 'k', header: 'k' }, rows[0]!)).toBe('2.5')
    const f: Col<R> = { id: 'k', header: 'k', format: r => r.k.toFixed(2) }
    expect(cellText(f, rows[0]!)).toBe('2.50')
  })
  it('cycles a header through ascending, descending and none, and says so to assistive technology (WAI-ARIA aria-sort)', () => {
    expect(nextSort('', 'k')).toBe('k')
    expect(nextSort('k', 'k')).toBe('-k')
    expect(nextSort('-k', 'k')).toBe('')
    expect(nextSort('-name', 'k')).toBe('k')
    expect(ariaSortOf('k', 'k')).toBe('ascending')
    expect(ariaSortOf('-k', 'k')).toBe('descending')
    expect(ariaSortOf('-name', 'k')).toBe('none')
  })
})

describe('pasted points (app/utils/points.ts)', () => {
  it('reads commas, spaces or semicolons, skips notes, and names the lines that are not numbers', () => {
    const { rows, bad } = parsePoints('# ΔG, log k\n-0.8, 9.5, 0.1\n-1.0 9.9 0 300\nabc, 1\n\n-1.2;10.1')
    expect(rows).toEqual([
      { deltaG: -0.8, log10Rate: 9.5, log10RateUncertainty: 0.1 },
      { deltaG: -1, log10Rate: 9.9, temperatureK: 300 },
      { deltaG: -1.2, log10Rate: 10.1 }
    ])
    expect(bad).toEqual([4])
  })
})

describe('API problems (app/utils/api-problem.ts)', () => {
  it('takes the server sentence and its issues from a $fetch error, and the message from anything else', () => {
    const fetchError = { statusCode: 422, data: { message: 'Invalid body', data: { issues: [{ path: '/name', message: 'required' }] } } }
    expect(apiProblem(fetchError)).toEqual({ message: 'Invalid body', issues: [{ path: '/name', message: 'required' }], status: 422 })
    expect(apiProblem(new Error('offline')).message).toBe('offline')
  })
})
