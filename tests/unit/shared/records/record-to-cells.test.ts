import { describe, expect, it } from 'vitest'
import { ingestRow, type SchemaValidator } from '../../../../shared/records/ingest'
import { keepReported, recordToCells } from '../../../../shared/records/record-to-cells'
import validate from '../../../../shared/records/generated/rate-record.validate.mjs'
import { DATASETS, SOLVENTS, demoRecords } from '../../../../scripts/lib/scenario'

const ctx = { solvents: new Map(SOLVENTS.map(s => [s.name.toLowerCase(), { ...s, viscosity: s.viscosity ?? null }])) }

describe('a stored record as the entry form\'s cells (the form edits what it entered)', () => {
  it('every demo record goes to cells and back to the same canonical values', () => {
    let n = 0
    for (const ds of DATASETS) {
      for (const r of demoRecords(ds, 0).slice(0, 40)) {
        const { cells, units } = recordToCells(r)
        const back = ingestRow(cells, units, validate as SchemaValidator, ctx)
        expect(back.issues, JSON.stringify({ cells, issues: back.issues })).toEqual([])
        const b = back.record!
        expect(b.system).toEqual(r.system)
        expect(b.process).toBe(r.process)
        expect(b.temperatureK).toBeCloseTo(r.temperatureK, 10)
        // a rate from lifetimes is derived again from the lifetimes (the demo stored it to 6 significant digits)
        expect(b.rate.value / r.rate.value).toBeCloseTo(1, r.rate.method === 'lifetimes' ? 5 : 9)
        // a ΔG° from potentials is derived again by the form; the demo stored it rounded to 1 meV
        if (r.drivingForce) expect(b.drivingForce!.value).toBeCloseTo(r.drivingForce.value, r.drivingForce.method === 'redox-potentials' ? 3 : 9)
        n++
      }
    }
    expect(n).toBeGreaterThan(100)
  })
  it('keeps the value as first reported while the canonical value is unchanged, and drops it once it changes', () => {
    const r = demoRecords(DATASETS[0]!, 0)[0]!
    const withOriginal = { ...r, rate: { ...r.rate, original: { value: 2.5, unit: 'ns-1' } } }
    expect(keepReported(withOriginal, r).rate.original).toEqual({ value: 2.5, unit: 'ns-1' })
    expect(keepReported(withOriginal, { ...r, rate: { ...r.rate, value: r.rate.value * 2 } }).rate.original).toBeUndefined()
  })
})
