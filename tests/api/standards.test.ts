/**
 * Exports checked against the published standards' own files (copied unchanged into tests/fixtures/standards, see its
 * README): DataCite 4.3 JSON schema, CSL-JSON data schema, CFF 1.2.0 schema, and the schema.org context through a
 * JSON-LD processor (jsonld.js). Every published dataset of the demo is checked, and the withdrawn one.
 */
import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import AjvDraft7 from 'ajv'
import addFormats from 'ajv-formats'
import AdmZip from 'adm-zip'
import { parse as parseYaml } from 'yaml'
import jsonld from 'jsonld'
import { XMLParser } from 'fast-xml-parser'
import { api, ROOT, startServer, type TestServer } from '../helpers/server'

let s: TestServer
let published: { id: number, title: string }[] = []
let withdrawnId = 0
beforeAll(async () => {
  s = await startServer({ seed: true })
  published = (await api(s.url, '/api/v1/datasets?pageSize=100')).data.items.filter((d: any) => d.state === 'published')
  for (let id = 1; id <= 20 && !withdrawnId; id++) {
    const r = await api(s.url, `/api/v1/datasets/${id}?pageSize=1`)
    if (r.status === 200 && r.data.version.state === 'withdrawn') withdrawnId = id
  }
}, 90_000)
afterAll(async () => { await s?.stop() })

const standard = (name: string) => JSON.parse(readFileSync(join(ROOT, 'tests/fixtures/standards', name), 'utf8'))
const citation = async (id: number, format: string) => (await fetch(`${s.url}/api/v1/datasets/${id}/citation?format=${format}`)).text()

/** ajv for the draft-07 schemas, with the date formats DataCite 4.3 names (W3C-DTF / ISO 8601 forms). */
function draft7 () {
  const ajv = new AjvDraft7({ allErrors: true, strict: false })
  addFormats(ajv)
  const year = '\\d{4}'
  const ym = `${year}-(0[1-9]|1[0-2])`
  const date = `${ym}-(0[1-9]|[12]\\d|3[01])`
  const dt = `${date}T\\d{2}:\\d{2}(:\\d{2}(\\.\\d+)?)?(Z|[+-]\\d{2}:\\d{2})?`
  const formats: Record<string, string> = { year: year, yearmonth: ym, datetime: dt }
  for (const [k, re] of Object.entries({ year, yearmonth: ym, date, datetime: dt })) formats[`${k}-range`] = `${re}/${re}`
  for (const [name, re] of Object.entries(formats)) ajv.addFormat(name, new RegExp(`^${re}$`))
  return ajv
}

describe('DataCite 4.3', () => {
  it('every published version validates against the DataCite 4.3 JSON schema (REST envelope and its doi/url aside)', async () => {
    // the file names itself with draft-04's `id`; ajv takes the same name as `$id` (the file itself is unchanged)
    const { id: schemaId, ...datacite } = standard('datacite-4.3.schema.json')
    const validate = draft7().compile({ $id: schemaId, ...datacite })
    expect(published.length).toBeGreaterThan(3)
    for (const d of published) {
      const { doi, url, ...attributes } = JSON.parse(await citation(d.id, 'datacite-json')).data.attributes
      expect(validate(attributes), `${d.id}: ${JSON.stringify(validate.errors)}`).toBe(true)
      expect(attributes.identifiers).toEqual([{ identifier: doi, identifierType: 'DOI' }])
      expect(url).toMatch(new RegExp(`/datasets/${d.id}\\?version=\\d+$`))
      // structured creators, dates and rights complete
      for (const c of attributes.creators) {
        expect(c.nameType).toBe('Personal')
        expect(c.name).toBe(`${c.familyName}, ${c.givenName}`)
      }
      expect(attributes.dates.map((x: any) => x.dateType)).toEqual(expect.arrayContaining(['Issued', 'Available']))
      expect(attributes.rightsList[0]).toMatchObject({ rightsUri: expect.stringMatching(/^https:\/\/spdx\.org\/licenses\//), rights: expect.any(String) })
      expect(attributes.relatedIdentifiers.some((r: any) => r.relationType === 'IsSupplementTo')).toBe(true)
    }
    // the schema can fail: without a publisher the record is refused
    const one = JSON.parse(await citation(published[0]!.id, 'datacite-json')).data.attributes
    delete one.doi; delete one.url; delete one.publisher
    expect(validate(one)).toBe(false)
  })
  it('a withdrawn version is still described, with its Withdrawn date', async () => {
    expect(withdrawnId).toBeGreaterThan(0)
    const r = await api(s.url, `/api/v1/datasets/${withdrawnId}`)
    const ld = r.data.jsonLd
    expect(ld.creativeWorkStatus).toBe('Withdrawn')
    expect(ld.distribution).toBeUndefined()
    const dc = await fetch(`${s.url}/api/v1/datasets/${withdrawnId}/citation?format=datacite-json`)
    expect(dc.status).toBe(200)
    const dates = (await dc.json() as any).data.attributes.dates
    expect(dates.find((d: any) => d.dateType === 'Withdrawn')?.date).toBe(String(r.data.version.withdrawnAt).slice(0, 10))
  })
})

describe('CSL-JSON and CFF', () => {
  it('CSL-JSON validates against the CSL data schema (no licence variable; names as family/given)', async () => {
    const validate = draft7().compile(standard('csl-data-1.0.2.schema.json'))
    for (const d of published) {
      const csl = JSON.parse(await citation(d.id, 'csl-json'))
      expect(validate(csl), `${d.id}: ${JSON.stringify(validate.errors)}`).toBe(true)
      expect(csl[0].license).toBeUndefined()
      expect(csl[0].author[0]).toEqual({ family: expect.any(String), given: expect.any(String) })
      expect(csl[0].note).toMatch(/Supplement to https:\/\/doi\.org\/10\./)
    }
    // the schema refuses what the old export wrote
    expect(validate([{ id: 'x', type: 'dataset', license: 'CC-BY-4.0' }])).toBe(false)
  })
  it('dataset CITATION.cff and a selection bundle\'s CITATION.cff (with references) validate against CFF 1.2.0', async () => {
    const validate = draft7().compile(standard('cff-1.2.0.schema.json'))
    for (const d of published) {
      const doc = parseYaml(await citation(d.id, 'cff'))
      expect(validate(doc), `${d.id}: ${JSON.stringify(validate.errors)}`).toBe(true)
      expect(doc.identifiers.map((i: any) => i.description)).toContain('The article these data supplement')
    }
    const bundle = await fetch(`${s.url}/api/v1/bundles`, { method: 'POST', headers: { 'content-type': 'application/json', 'origin': s.url }, body: JSON.stringify({ query: { q: 'porphyrin' } }) })
    expect(bundle.status).toBe(200)
    const entry = new AdmZip(Buffer.from(await bundle.arrayBuffer())).getEntries().find(e => e.entryName.endsWith('/data/CITATION.cff'))!
    const cff = parseYaml(entry.getData().toString())
    expect(cff.references.length).toBeGreaterThan(1)
    expect(validate(cff), JSON.stringify(validate.errors)).toBe(true)
    expect(validate({ ...cff, references: [{ ...cff.references[0], type: 'dataset' }] })).toBe(false) // the old reference type
  })
  it('BibTeX and RIS carry the related article', async () => {
    const d = published[0]!.id
    expect(await citation(d, 'bibtex')).toMatch(/note = \{Licence: [\w.-]+\. Supplement to https:\/\/doi\.org\/10\.99999\/demo-article/)
    expect(await citation(d, 'ris')).toMatch(/N1 {2}- Supplement to https:\/\/doi\.org\/10\.99999\/demo-article/)
  })
})

describe('landing pages for people and crawlers', () => {
  const page = async (path: string) => {
    const r = await fetch(s.url + path)
    return { status: r.status, html: await r.text() }
  }
  const jsonLdOf = (html: string) => JSON.parse(html.match(/<script[^>]*type="application\/ld\+json"[^>]*>([\s\S]*?)<\/script>/)![1]!)

  it('JSON-LD expands against the schema.org context with no term dropped, and names what search engines ask for', async () => {
    const context = standard('schemaorg-context.jsonld')
    // offline: the only document the processor may load is the local copy of the schema.org context
    const documentLoader = async (url: string) => {
      if (/^https?:\/\/schema\.org\/?$/.test(url)) return { contextUrl: undefined, documentUrl: url, document: context }
      throw new Error(`no network in tests: ${url}`)
    }
    const { html } = await page(`/datasets/${published[0]!.id}`)
    const doc = jsonLdOf(html)
    for (const k of ['@id', 'distribution', 'variableMeasured', 'measurementTechnique', 'funder', 'includedInDataCatalog', 'citation', 'creator', 'license'])
      expect(doc[k], k).toBeDefined()
    const [expanded] = await jsonld.expand(doc, { documentLoader: documentLoader as never }) as any[]
    const terms = Object.keys(doc).filter(k => !k.startsWith('@'))
    for (const t of terms) expect(expanded[`http://schema.org/${t}`], `term ${t} dropped by expansion`).toBeDefined()
    expect(expanded['@id']).toBe(doc['@id'])
    const content = expanded['http://schema.org/distribution'][0]['http://schema.org/contentUrl'][0] // the context types it @id
    expect(content['@id'] ?? content['@value']).toMatch(/\/api\/v1\/datasets\/\d+\/bundle\?version=\d+$/)
    // the withdrawn one expands too
    const w = await jsonld.expand(jsonLdOf((await page(`/datasets/${withdrawnId}`)).html), { documentLoader: documentLoader as never }) as any[]
    expect(w[0]['http://schema.org/creativeWorkStatus'][0]['@value']).toBe('Withdrawn')
  })
  it('missing or hidden datasets and records answer 404 with noindex; others have their own description, a canonical link and Open Graph', async () => {
    for (const path of ['/datasets/99999', '/records/99999999', '/datasets/3']) {
      const r = await page(path)
      expect(r.status, path).toBe(404)
      expect(r.html).toMatch(/<meta name="robots" content="noindex">/)
      expect(r.html).not.toMatch(/rel="canonical"/)
    }
    const id = published[0]!.id
    const a = await page(`/datasets/${id}?version=1&page=2`)
    expect(a.status).toBe(200)
    expect(a.html).toContain(`<link rel="canonical" href="${s.url}/datasets/${id}">`)
    expect(a.html).toMatch(/<meta property="og:title" content="[^"]+">/)
    expect(a.html).toContain(`<meta property="og:url" content="${s.url}/datasets/${id}">`)
    const description = (html: string) => html.match(/<meta name="description" content="([^"]*)">/g) ?? []
    expect(description(a.html)).toHaveLength(1)
    const seen = new Set<string>()
    for (const path of ['/', '/explore', '/compare', '/model', '/format', '/datasets', `/datasets/${id}`, '/records/1']) {
      const d = description((await page(path)).html)
      expect(d, path).toHaveLength(1)
      seen.add(d[0]!)
    }
    expect(seen.size).toBe(8)
  })
  it('/sitemap.xml lists the public pages and every published landing page once', async () => {
    const r = await fetch(`${s.url}/sitemap.xml`)
    expect(r.headers.get('content-type')).toContain('application/xml')
    const doc = new XMLParser().parse(await r.text())
    const locs: string[] = [doc.urlset.url].flat().map((u: any) => u.loc)
    expect(new Set(locs).size).toBe(locs.length)
    for (const d of published) expect(locs).toContain(`${s.url}/datasets/${d.id}`)
    expect(locs).not.toContain(`${s.url}/datasets/3`)
    expect(locs).toContain(`${s.url}/explore`)
  })
})
