import { readdirSync, statSync } from 'node:fs'
import { join, relative } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import SwaggerParser from '@apidevtools/swagger-parser'
import Ajv2020 from 'ajv/dist/2020.js'
import addFormats from 'ajv-formats'
import { api, ROOT, signIn, startServer, type TestServer } from '../helpers/server'

let s: TestServer
beforeAll(async () => { s = await startServer({ seed: true }) })
afterAll(async () => { await s?.stop() })

async function datasetIdByState (state: string, cookie?: string) {
  const r = await api(s.url, `/api/v1/datasets?state=${state}&pageSize=100`, { headers: cookie ? { cookie } : {} })
  return r.data.items as { id: number, labName: string, state: string }[]
}

describe('service routes', () => {
  it('health reports the database and the record count', async () => {
    const r = await api(s.url, '/api/v1/health')
    expect(r.data).toMatchObject({ status: 'ok', database: 'ok' })
    expect(r.data.records).toBeGreaterThan(2000)
    expect(r.data.version).toMatch(/^\d+\.\d+\.\d+/)
  })
  it('the OpenAPI document lists every /api/v1 route file', async () => {
    const r = await api(s.url, '/api/v1/openapi.json')
    expect(r.status).toBe(200)
    expect(r.data.openapi).toMatch(/^3\./)
    const dir = join(ROOT, 'server/api/v1')
    const files: string[] = []
    const walk = (d: string) => { for (const f of readdirSync(d)) { const p = join(d, f); if (statSync(p).isDirectory()) walk(p); else files.push(p) } }
    walk(dir)
    expect(files.length).toBeGreaterThan(8)
    for (const f of files) {
      const m = relative(dir, f).match(/^(.*?)\.(get|post|put|patch|delete)\.ts$/)!
      const path = ('/api/v1/' + m[1]!.replace(/\/?index$/, '').replace(/\[(\w+)\]/g, '{$1}')).replace(/\/$/, '')
      expect(Object.keys(r.data.paths), path).toContain(path)
      expect(r.data.paths[path][m[2]!], `${m[2]} ${path}`).toBeDefined()
    }
    // the dataset routes document the record query parameters the server validates, with their allowed values
    for (const path of ['/api/v1/datasets/{id}', '/api/v1/datasets/{id}/versions/{n}']) {
      const params = r.data.paths[path].get.parameters as { name: string, in: string, schema: { enum?: string[] } }[]
      expect(params.map(p => p.name)).toEqual(expect.arrayContaining(['id', 'records', 'sort', 'page', 'pageSize']))
      expect(params.find(p => p.name === 'sort')!.schema.enum).toContain('-log10Rate')
    }
  })
  it('the OpenAPI document passes a maintained validator and states parameters, security, operation ids and errors', async () => {
    const doc = (await api(s.url, '/api/v1/openapi.json')).data
    // @apidevtools/swagger-parser validates against the official OpenAPI 3.1 schema and resolves every $ref
    await SwaggerParser.validate(structuredClone(doc))
    const ids = new Set<string>()
    for (const [path, ops] of Object.entries(doc.paths) as [string, Record<string, any>][]) {
      for (const [method, op] of Object.entries(ops)) {
        const where = `${method.toUpperCase()} ${path}`
        // every template segment is a required path parameter (OpenAPI 3.1 §4.8.12.1)
        for (const [, name] of path.matchAll(/\{(\w+)\}/g))
          expect(op.parameters.find((p: any) => p.in === 'path' && p.name === name)?.required, `${where} {${name}}`).toBe(true)
        expect(op.operationId, where).toMatch(/^[a-z]+[A-Za-z]+$/)
        expect(ids.has(op.operationId), `${where}: operationId unique`).toBe(false)
        ids.add(op.operationId)
        expect(op.security?.length, where).toBeGreaterThan(0)
        for (const [code, r] of Object.entries(op.responses) as [string, any][]) {
          if (code.startsWith('4')) expect(r.$ref ?? r.content['application/json'].schema.$ref, `${where} ${code}`).toMatch(/Problem/)
        }
      }
    }
    expect(Object.keys(doc.components.securitySchemes)).toEqual(['bearerToken', 'sessionCookie'])
    // the lists that were lost before: search and dataset-list parameters, the citation format (required, with values)
    const names = (path: string) => doc.paths[path].get.parameters.map((p: any) => p.name)
    expect(names('/api/v1/records')).toEqual(expect.arrayContaining(['q', 'process', 'deltaGMin', 'log10RateMax', 'sort', 'page']))
    expect(names('/api/v1/datasets')).toEqual(expect.arrayContaining(['q', 'state', 'lab', 'page', 'pageSize']))
    const format = doc.paths['/api/v1/datasets/{id}/citation'].get.parameters.find((p: any) => p.name === 'format')
    expect(format).toMatchObject({ required: true, schema: { enum: ['bibtex', 'ris', 'csl-json', 'datacite-json', 'cff'] } })
    expect(names('/api/v1/datasets/{id}/bundle')).toEqual(['id', 'version'])
  })
  it('operations documented as public answer a visitor; the others answer 401 (every GET without path parameters)', async () => {
    const doc = (await api(s.url, '/api/v1/openapi.json')).data
    for (const [path, ops] of Object.entries(doc.paths) as [string, Record<string, any>][]) {
      if (!ops.get || path.includes('{')) continue
      const open = ops.get.security.some((r: object) => Object.keys(r).length === 0)
      const status = (await fetch(s.url + path)).status
      if (open) expect(status, path).not.toBe(401)
      else expect(status, path).toBe(401)
    }
  })
  it('live answers of the public GET routes match their documented response schemas', async () => {
    const doc = (await api(s.url, '/api/v1/openapi.json')).data
    const ajv = new Ajv2020({ strict: false, allErrors: true })
    addFormats(ajv)
    const examples: Record<string, string> = {
      '/api/v1/records': '/api/v1/records?q=porphyrin&pageSize=5',
      '/api/v1/records/ids': '/api/v1/records/ids?solvent=toluene',
      '/api/v1/records/{id}': '/api/v1/records/200',
      '/api/v1/records/{id}/similar': '/api/v1/records/200/similar?limit=3',
      '/api/v1/datasets': '/api/v1/datasets',
      '/api/v1/datasets/{id}': '/api/v1/datasets/1?pageSize=3',
      '/api/v1/datasets/{id}/versions/{n}': '/api/v1/datasets/1/versions/1?pageSize=3',
      '/api/v1/labs': '/api/v1/labs',
      '/api/v1/health': '/api/v1/health',
      '/api/v1/overview': '/api/v1/overview',
      '/api/v1/solvents': '/api/v1/solvents',
      '/api/v1/me': '/api/v1/me',
      '/api/v1/systems': '/api/v1/systems?q=xylylene',
      '/api/v1/datasets/{id}/usage': '/api/v1/datasets/1/usage?from=2026-01&until=2026-12',
      '/api/v1/systems/{key}': `/api/v1/systems/${(await api(s.url, '/api/v1/systems')).data.items[0].key}`
    }
    let checked = 0
    for (const [path, ops] of Object.entries(doc.paths) as [string, Record<string, any>][]) {
      const schema = ops.get?.responses['200']?.content?.['application/json']?.schema
      if (!schema) continue
      expect(examples[path], `an example request for ${path}`).toBeDefined()
      const r = await api(s.url, examples[path]!)
      expect(r.status, path).toBe(200)
      const validate = ajv.compile(schema)
      expect(validate(r.data), `${path}: ${JSON.stringify(validate.errors)}`).toBe(true)
      checked++
    }
    expect(checked).toBe(Object.keys(examples).length)
    // and the problem shape of an error answer
    const bad = await api(s.url, '/api/v1/records?sort=sideways')
    expect(ajv.compile(doc.components.schemas.Problem)(bad.data)).toBe(true)
  })
  it('serves the schemas with $id equal to their public URL', async () => {
    for (const name of ['rate-record.v1.json', 'dataset.v1.json']) {
      const r = await api(s.url, `/schemas/${name}`)
      expect(r.status).toBe(200)
      expect(r.data.$id).toBe(`${s.url}/schemas/${name}`)
      expect(r.headers.get('content-type')).toContain('application/schema+json')
    }
    expect((await api(s.url, '/schemas/nope.json')).status).toBe(404)
  })
})

describe('records and datasets for a visitor', () => {
  it('lists published records with facets; filters narrow the total', async () => {
    const all = await api(s.url, '/api/v1/records?pageSize=5')
    expect(all.status).toBe(200)
    expect(all.data.items).toHaveLength(5)
    expect(Object.keys(all.data.facets)).toEqual(expect.arrayContaining(['process', 'solvent', 'technique', 'linkage', 'lab']))
    const facetSum = Object.values(all.data.facets.linkage as Record<string, number>).reduce((a, b) => a + b, 0)
    expect(facetSum).toBe(all.data.total)
    const narrow = await api(s.url, '/api/v1/records?solvent=acetonitrile&deltaGMin=-1&deltaGMax=-0.2&pageSize=500')
    expect(narrow.data.total).toBeGreaterThan(0)
    expect(narrow.data.total).toBeLessThan(all.data.total)
    for (const r of narrow.data.items) {
      expect(r.solvent).toBe('acetonitrile')
      expect(r.deltaG).toBeGreaterThanOrEqual(-1)
      expect(r.deltaG).toBeLessThanOrEqual(-0.2)
    }
    const q = await api(s.url, '/api/v1/records?q=porphyrin&pageSize=1')
    expect(q.data.total).toBeGreaterThan(0) // matches dataset titles
    expect(q.data.items[0].datasetTitle.toLowerCase()).toContain('porphyrin')
    const zn = await api(s.url, '/api/v1/records?q=znp&pageSize=3')
    expect(zn.data.total).toBeGreaterThan(0)
  })
  it('422 for a range that is not a number, naming the parameter', async () => {
    const r = await api(s.url, '/api/v1/records?deltaGMin=abc&pageSize=0')
    expect(r.status).toBe(422)
    expect(r.data.data.issues.map((i: { path: string }) => i.path)).toEqual(expect.arrayContaining(['/deltaGMin', '/pageSize']))
  })
  it('shows only published and withdrawn datasets; drafts answer 404', async () => {
    const visible = await datasetIdByState('published')
    expect(visible.length).toBeGreaterThan(3)
    expect(await datasetIdByState('draft')).toHaveLength(0)
    const all = await api(s.url, '/api/v1/datasets?pageSize=100')
    expect(all.data.items.every((d: { state: string }) => ['published', 'withdrawn'].includes(d.state))).toBe(true)
    for (let id = 1; id <= 12; id++) {
      const r = await api(s.url, `/api/v1/datasets/${id}`)
      if (r.status === 200) expect(['published', 'withdrawn']).toContain(r.data.version.state)
      else expect(r.status).toBe(404)
    }
  })
  it('a withdrawn dataset keeps its landing page and identifier but offers no records', async () => {
    const [w] = await datasetIdByState('withdrawn')
    const r = await api(s.url, `/api/v1/datasets/${w!.id}`)
    expect(r.status).toBe(200)
    expect(r.data.version.doi).toMatch(/^10\.\d+\//)
    expect(r.data.records).toEqual([])
    expect(r.data.recordsHidden).toBe('withdrawn')
  })
  it('records=summary gives the same records with the table columns and without their JSON; an unknown value is refused by name', async () => {
    const [p] = await datasetIdByState('published')
    const full = await api(s.url, `/api/v1/datasets/${p!.id}`)
    const slim = await api(s.url, `/api/v1/datasets/${p!.id}?records=summary`)
    expect(slim.status).toBe(200)
    expect(slim.data.records.length).toBe(full.data.records.length)
    expect(slim.data.records.length).toBeGreaterThan(0)
    for (const [i, r] of slim.data.records.entries()) {
      expect(r.data).toBeUndefined()
      const { data, ...cols } = full.data.records[i]
      expect(data.system.donor.name).toBe(cols.donorName)
      expect(r).toEqual(cols)
    }
    const bad = await api(s.url, `/api/v1/datasets/${p!.id}?records=everything`)
    expect(bad.status).toBe(422)
    expect(bad.data.data.issues[0].path).toBe('/records')
  })
  it('pages and sorts a version\'s records on the server; records=points gives every point; a bad sort is refused by name', async () => {
    const [p] = await datasetIdByState('published')
    const all = (await api(s.url, `/api/v1/datasets/${p!.id}?records=summary`)).data.records as { id: number, log10Rate: number }[]
    const page2 = await api(s.url, `/api/v1/datasets/${p!.id}?records=summary&sort=-log10Rate&page=2&pageSize=3`)
    expect(page2.data.recordPage).toMatchObject({ page: 2, pageSize: 3, total: all.length })
    const sorted = [...all].sort((a, b) => b.log10Rate - a.log10Rate).slice(3, 6).map(r => r.log10Rate)
    expect(page2.data.records.map((r: { log10Rate: number }) => r.log10Rate)).toEqual(sorted)
    const points = await api(s.url, `/api/v1/datasets/${p!.id}?records=points`)
    expect(points.data.records).toEqual([])
    expect(points.data.points.map((r: { id: number }) => r.id)).toEqual(all.map(r => r.id))
    expect(Object.keys(points.data.points[0]).sort()).toEqual(['deltaG', 'id', 'log10Rate', 'solvent'])
    const bad = await api(s.url, `/api/v1/datasets/${p!.id}?sort=password`)
    expect(bad.status).toBe(422)
    expect(bad.data.data.issues[0].path).toBe('/sort')
  })
  it('a record of a draft is 404 for a visitor', async () => {
    const cookie = await signIn(s.url, 'imre.faulkwood@brightwater.example')
    const [draft] = await datasetIdByState('draft', cookie)
    const own = await api(s.url, `/api/v1/datasets/${draft!.id}`, { headers: { cookie } })
    expect(own.status).toBe(200)
    const recId = own.data.records[0].id
    expect((await api(s.url, `/api/v1/records/${recId}`, { headers: { cookie } })).status).toBe(200)
    expect((await api(s.url, `/api/v1/records/${recId}`)).status).toBe(404)
    expect((await api(s.url, `/api/v1/datasets/${draft!.id}`)).status).toBe(404)
  })
})

describe('who sees what when signed in', () => {
  it('a contributor sees their own lab\'s drafts but not another lab\'s', async () => {
    const imre = await signIn(s.url, 'imre.faulkwood@brightwater.example')
    const sunniva = await signIn(s.url, 'sunniva.orrel@lindqvale.example')
    const imreDrafts = await datasetIdByState('draft', imre)
    const sunDrafts = await datasetIdByState('draft', sunniva)
    expect(imreDrafts.every(d => d.labName === 'Faulkwood Ultrafast Lab')).toBe(true)
    expect(sunDrafts.every(d => d.labName === 'Orrel Solar-Fuels Group')).toBe(true)
    expect((await api(s.url, `/api/v1/datasets/${imreDrafts[0]!.id}`, { headers: { cookie: sunniva } })).status).toBe(404)
  })
  it('a curator sees submitted datasets of every lab; the admin sees all states', async () => {
    const pia = await signIn(s.url, 'pia.veldhaus@brightwater.example')
    const submitted = await datasetIdByState('submitted', pia)
    expect(new Set(submitted.map(d => d.labName)).size).toBeGreaterThan(1)
    const admin = await signIn(s.url, 'rowan.tessaly@crosspoint.example')
    const all = await api(s.url, '/api/v1/datasets?pageSize=100', { headers: { cookie: admin } })
    expect(new Set(all.data.items.map((d: { state: string }) => d.state))).toEqual(new Set(['draft', 'submitted', 'returned', 'published', 'withdrawn']))
  })
  it('a wrong password does not sign in', async () => {
    await expect(signIn(s.url, 'imre.faulkwood@brightwater.example', 'wrong')).rejects.toThrow(/sign-in failed/)
  })
})
