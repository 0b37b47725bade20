import { describe, expect, it } from 'vitest'
import Ajv2020 from 'ajv/dist/2020.js'
import addFormats from 'ajv-formats'
import rateRecord from '../../../schemas/rate-record.v1.json'
import dataset from '../../../schemas/dataset.v1.json'
import { DATASETS, SOLVENTS, demoMetadata, demoRecords } from '../../../scripts/lib/scenario'
import { checkRecord } from '../../../shared/records/ingest'

function ajv () {
  const a = new Ajv2020({ allErrors: true, strict: true, strictRequired: false })
  addFormats(a)
  return a
}

/** Every property node of a schema, with its JSON pointer. */
function properties (node: any, path = ''): [string, any][] {
  const out: [string, any][] = []
  if (node && typeof node === 'object') {
    for (const [k, v] of Object.entries(node.properties ?? {})) { out.push([`${path}/${k}`, v]); out.push(...properties(v, `${path}/${k}`)) }
    if (node.items) out.push(...properties(node.items, `${path}/*`))
    for (const [k, v] of Object.entries(node.$defs ?? {})) out.push(...properties(v, `#/$defs/${k}`))
  }
  return out
}

describe('the public JSON Schemas', () => {
  it.each([['rate-record.v1', rateRecord], ['dataset.v1', dataset]])('%s passes the JSON Schema 2020-12 meta-schema and compiles in strict mode', (_n, schema) => {
    const a = ajv()
    expect(a.validateSchema(schema)).toBe(true)
    expect(a.errors ?? null).toBeNull()
    expect(() => a.compile(schema)).not.toThrow()
    expect((schema as { $schema: string }).$schema).toBe('https://json-schema.org/draft/2020-12/schema')
  })
  it.each([['rate-record.v1', rateRecord], ['dataset.v1', dataset]])('every property of %s has a description that names its unit', (_n, schema) => {
    const props = properties(schema)
    expect(props.length).toBeGreaterThan(10)
    for (const [path, p] of props) {
      const d = (p as { description?: string }).description ?? ''
      const refOk = (p as { $ref?: string }).$ref && d
      expect(d, path).not.toBe('')
      if (!refOk && ((p as { type?: string }).type === 'number' || (p as { type?: string }).type === 'integer')) expect(d, path).toMatch(/Unit: /)
    }
  })
  it('every demo record also passes the rules every deposit path applies (checkRecord)', () => {
    const ctx = { solvents: new Map(SOLVENTS.map(s => [s.name, { name: s.name, permittivity: s.permittivity, refractiveIndex: s.refractiveIndex, viscosity: s.viscosity }])) }
    for (const ds of DATASETS) for (const v of [0, 1]) for (const r of demoRecords(ds, v)) expect(checkRecord(r, ctx).issues, JSON.stringify(r)).toEqual([])
  })
  it('every demo record and dataset is valid against the schemas', () => {
    const a = ajv()
    const vr = a.compile(rateRecord); const vd = a.compile(dataset)
    for (const ds of DATASETS) {
      for (const r of demoRecords(ds, 0)) expect(vr(r), JSON.stringify(vr.errors)).toBe(true)
      expect(vd(demoMetadata(ds, [{ name: 'Demo, Person', orcid: '0000-0002-1825-0097' }])), JSON.stringify(vd.errors)).toBe(true)
    }
  })
  it('refuses a record with a bad enum, a negative rate and an unknown field, naming each pointer', () => {
    const v = ajv().compile(rateRecord)
    const rec = { ...demoRecords(DATASETS[0]!, 0)[0]!, process: 'teleportation', extra: 1 } as Record<string, unknown>
    ;(rec.rate as { value: number }).value = -3
    expect(v(rec)).toBe(false)
    const where = (v.errors ?? []).map(e => `${e.instancePath}|${e.keyword}`)
    expect(where).toContain('/process|enum')
    expect(where).toContain('/rate/value|exclusiveMinimum')
    expect(where).toContain('|additionalProperties')
  })
})
