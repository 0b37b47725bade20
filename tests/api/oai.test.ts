/**
 * The OAI-PMH endpoint checked against the protocol's rules (Open Archives Initiative, "The Open Archives Initiative
 * Protocol for Metadata Harvesting", version 2.0, 2002-06-14; sections cited beside each check). Lists are paged at 3
 * items here so that a full harvest of the demo takes several resumption tokens.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { XMLParser } from 'fast-xml-parser'
import { api, startServer, type TestServer } from '../helpers/server'

let s: TestServer
let published: { id: number, labId: number }[] = []
let labs: { id: number, name: string }[] = []
const WITHDRAWN_TITLE = /withdrawn/i
beforeAll(async () => {
  s = await startServer({ seed: true, env: { NUXT_OAI_PAGE_SIZE: '3' } })
  published = (await api(s.url, '/api/v1/datasets?pageSize=100')).data.items.filter((d: any) => d.state === 'published')
  labs = (await api(s.url, '/api/v1/labs')).data.items
}, 90_000)
afterAll(async () => { await s?.stop() })

const parser = new XMLParser({ ignoreAttributes: false, attributeNamePrefix: '@', parseTagValue: false, parseAttributeValue: false, isArray: name => ['record', 'header', 'set', 'metadataFormat', 'dc:creator', 'dc:identifier', 'setSpec'].includes(name) })
async function oai (query: string, method: 'GET' | 'POST' = 'GET') {
  const r = method === 'GET'
    ? await fetch(`${s.url}/oai?${query}`)
    : await fetch(`${s.url}/oai`, { method: 'POST', headers: { 'content-type': 'application/x-www-form-urlencoded' }, body: query })
  expect(r.status).toBe(200) // errors too are answered with 200 (§3.6)
  expect(r.headers.get('content-type')).toMatch(/^text\/xml/)
  const text = await r.text()
  const doc = parser.parse(text)['OAI-PMH']
  // §3.2: responseDate in UTC at seconds, the request element holds the base URL
  expect(doc.responseDate).toMatch(/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}Z$/)
  const request = typeof doc.request === 'string' ? { '#text': doc.request } : doc.request
  expect(request['#text']).toBe(`${s.url}/oai`)
  return { doc, request, text }
}
const errorOf = async (query: string) => {
  const { doc, request } = await oai(query)
  return { code: doc.error?.['@code'] as string | undefined, request }
}

describe('OAI-PMH 2.0', () => {
  it('Identify names the repository, its base URL, granularity and persistent deletions (§4.2)', async () => {
    const { doc, request } = await oai('verb=Identify')
    const id = doc.Identify
    expect(request['@verb']).toBe('Identify')
    expect(id.baseURL).toBe(`${s.url}/oai`)
    expect(id.protocolVersion).toBe('2.0')
    expect(id.deletedRecord).toBe('persistent')
    expect(id.granularity).toBe('YYYY-MM-DDThh:mm:ssZ')
    expect(id.adminEmail).toMatch(/@/)
    expect(id.earliestDatestamp).toMatch(/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}Z$/)
  })
  it('ListMetadataFormats offers oai_dc and oai_datacite, also for one item; ListSets has one set per lab (§4.4, §4.6)', async () => {
    const formats = (await oai('verb=ListMetadataFormats')).doc.ListMetadataFormats.metadataFormat.map((f: any) => f.metadataPrefix)
    expect(formats).toEqual(['oai_dc', 'oai_datacite'])
    const sets = (await oai('verb=ListSets')).doc.ListSets.set
    expect(sets.map((x: any) => x.setName).sort()).toEqual(labs.map(l => l.name).sort())
  })

  it('a full harvest, page by page, returns every published dataset once and the withdrawn one as deleted (§4.5, §3.5)', async () => {
    const seen: { id: string, deleted: boolean, datestamp: string, sets: string[], title?: string }[] = []
    let { doc } = await oai('verb=ListRecords&metadataPrefix=oai_dc')
    let pages = 0
    let size: number
    for (;;) {
      pages++
      const list = doc.ListRecords
      for (const r of list.record) {
        const h = r.header[0]
        seen.push({ id: h.identifier, deleted: h['@status'] === 'deleted', datestamp: h.datestamp, sets: h.setSpec, title: r.metadata?.['oai_dc:dc']?.['dc:title'] })
        // §2.5.1: a deleted record has a header and no metadata; any other record has metadata
        if (h['@status'] === 'deleted') expect(r.metadata).toBeUndefined()
        else expect(r.metadata['oai_dc:dc']['dc:identifier'].some((x: string) => x.startsWith('https://doi.org/10.'))).toBe(true)
      }
      const token = list.resumptionToken
      expect(token, 'a list longer than one page carries a resumptionToken on every page').toBeDefined()
      expect(Number(token['@cursor'])).toBe(seen.length - list.record.length) // §3.5.1 cursor: items before this page
      size = Number(token['@completeListSize'])
      const value = typeof token === 'string' ? token : token['#text']
      if (!value) break // the last page: an empty token
      expect(list.record.length).toBe(3)
      ;({ doc } = await oai(`verb=ListRecords&resumptionToken=${encodeURIComponent(value)}`))
    }
    expect(pages).toBeGreaterThan(1)
    expect(seen.length).toBe(size)
    expect(new Set(seen.map(x => x.id)).size).toBe(seen.length) // each item once
    const live = seen.filter(x => !x.deleted).map(x => Number(x.id.split('/').pop())).sort((a, b) => a - b)
    expect(live).toEqual(published.map(d => d.id).sort((a, b) => a - b))
    const deleted = seen.filter(x => x.deleted)
    expect(deleted).toHaveLength(1)
    const tomb = await api(s.url, `/api/v1/datasets/${deleted[0]!.id.split('/').pop()}`)
    expect(tomb.data.version.title).toMatch(WITHDRAWN_TITLE)
    expect(deleted[0]!.datestamp.slice(0, 10)).toBe(String(tomb.data.version.withdrawnAt).slice(0, 10))
    // ListIdentifiers walks the same items
    const ids = await oai('verb=ListIdentifiers&metadataPrefix=oai_datacite')
    expect(Number(ids.doc.ListIdentifiers.resumptionToken['@completeListSize'])).toBe(size)
  })

  it('selects by set and by from/until, inclusive, at either granularity (§3.3, §4.6)', async () => {
    const all = (await oai('verb=ListIdentifiers&metadataPrefix=oai_dc&set=faulkwood-ultrafast')).doc.ListIdentifiers.header
    const lab = labs.find(l => l.name.startsWith('Faulkwood'))!
    const own = published.filter(d => d.labId === lab.id).map(d => d.id)
    expect(all.filter((h: any) => h['@status'] !== 'deleted').map((h: any) => Number(h.identifier.split('/').pop())).sort()).toEqual(own.sort())
    for (const h of all) expect(h.setSpec).toEqual(['faulkwood-ultrafast'])
    const first = all[0]
    const stamp = first.datestamp as string
    const on = (await oai(`verb=ListIdentifiers&metadataPrefix=oai_dc&from=${stamp}&until=${stamp}`)).doc.ListIdentifiers.header
    expect(on.map((h: any) => h.identifier)).toContain(first.identifier)
    const day = stamp.slice(0, 10)
    const sameDay = (await oai(`verb=ListIdentifiers&metadataPrefix=oai_dc&from=${day}&until=${day}`)).doc.ListIdentifiers.header
    expect(sameDay.map((h: any) => h.identifier)).toContain(first.identifier)
    expect((await errorOf('verb=ListRecords&metadataPrefix=oai_dc&from=2999-01-01')).code).toBe('noRecordsMatch')
    expect((await errorOf('verb=ListRecords&metadataPrefix=oai_dc&until=1990-01-01')).code).toBe('noRecordsMatch')
    expect((await errorOf('verb=ListRecords&metadataPrefix=oai_dc&set=no-such-lab')).code).toBe('noRecordsMatch')
  })

  it('GetRecord gives DataCite kernel-4 XML under oai_datacite, and a deleted header for the withdrawn dataset (§4.1)', async () => {
    const id = published[0]!.id
    const host = new URL(s.url).hostname
    const { doc } = await oai(`verb=GetRecord&identifier=oai:${host}:dataset/${id}&metadataPrefix=oai_datacite`)
    const resource = doc.GetRecord.record[0].metadata.oai_datacite.payload.resource
    expect(resource['@xmlns']).toBe('http://datacite.org/schema/kernel-4')
    const dc = (await api(s.url, `/api/v1/datasets/${id}/citation?format=datacite-json`)).data.data.attributes
    expect(resource.identifier['#text']).toBe(dc.doi)
    expect(resource.publisher).toBe(dc.publisher)
    expect(String(resource.publicationYear)).toBe(dc.publicationYear)
    const creators = [resource.creators.creator].flat()
    expect(creators.map((c: any) => c.creatorName['#text'])).toEqual(dc.creators.map((c: any) => c.name))
    // POST gives the same answer as GET (§3.1.1.2)
    const post = await oai(`verb=GetRecord&identifier=oai:${host}:dataset/${id}&metadataPrefix=oai_datacite`, 'POST')
    expect(post.doc.GetRecord.record[0].header[0].identifier).toBe(`oai:${host}:dataset/${id}`)
  })

  it.each([
    ['no verb', '', 'badVerb'],
    ['an unknown verb', 'verb=ListEverything', 'badVerb'],
    ['a repeated verb', 'verb=Identify&verb=Identify', 'badArgument'],
    ['an argument the verb does not take', 'verb=Identify&set=x', 'badArgument'],
    ['a missing metadataPrefix', 'verb=ListRecords', 'badArgument'],
    ['an empty argument', 'verb=ListRecords&metadataPrefix=', 'badArgument'],
    ['a resumptionToken with other arguments', 'verb=ListRecords&metadataPrefix=oai_dc&resumptionToken=x', 'badArgument'],
    ['a date that is no date', 'verb=ListRecords&metadataPrefix=oai_dc&from=2026-02-30', 'badArgument'],
    ['from and until of two granularities', 'verb=ListRecords&metadataPrefix=oai_dc&from=2020-01-01&until=2030-01-01T00:00:00Z', 'badArgument'],
    ['from after until', 'verb=ListRecords&metadataPrefix=oai_dc&from=2030-01-01&until=2020-01-01', 'badArgument'],
    ['a format not offered', 'verb=ListRecords&metadataPrefix=marc21', 'cannotDisseminateFormat'],
    ['a token not issued here', 'verb=ListRecords&resumptionToken=bm90LWEtdG9rZW4', 'badResumptionToken'],
    ['an unknown identifier', 'verb=GetRecord&metadataPrefix=oai_dc&identifier=oai:elsewhere:dataset/1', 'idDoesNotExist'],
    ['an item that does not exist', 'verb=GetRecord&metadataPrefix=oai_dc&identifier=oai:HOST:dataset/99999', 'idDoesNotExist'],
    ['formats of an unknown item', 'verb=ListMetadataFormats&identifier=oai:HOST:dataset/99999', 'idDoesNotExist']
  ])('answers %s with the error code the protocol names (§3.6)', async (_name, query, code) => {
    const e = await errorOf(query.replace('HOST', new URL(s.url).hostname))
    expect(e.code).toBe(code)
    // §3.2: with badVerb or badArgument the request element carries no attributes
    if (code === 'badVerb' || code === 'badArgument') expect(Object.keys(e.request).filter(k => k.startsWith('@'))).toEqual([])
  })
})
