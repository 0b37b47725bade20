/**
 * OAI-PMH 2.0 (Open Archives Initiative Protocol for Metadata Harvesting, protocol version 2.0 of 2002-06-14):
 * one item per dataset, its newest published or withdrawn version; a withdrawn version is a deleted record, kept
 * for good (deletedRecord "persistent"); one set per lab. Written here because the protocol is six verbs over one
 * query, and the maintained npm providers bring their own storage and web framework.
 *
 * Resumption tokens carry the request and the position (base64url JSON); a token that does not decode to a valid
 * request is badResumptionToken. The list order (dataset id) is stable, so a harvest that runs while datasets are
 * published still sees each item at most once per pass.
 */
import { and, eq, inArray, sql } from 'drizzle-orm'
import { schema, useDb } from '../storage/db'
import { publicUrl } from '../services/mail'
import { toCitable } from './citation'
import { METADATA_FORMATS, type MetadataPrefix, metadataOf, xmlText } from './oai-metadata'

export const OAI_VERBS = ['Identify', 'ListMetadataFormats', 'ListSets', 'ListIdentifiers', 'ListRecords', 'GetRecord'] as const
type Verb = (typeof OAI_VERBS)[number]
/** The arguments each verb takes (§3.1.1): required ones first; resumptionToken is exclusive. */
const ARGS: Record<Verb, { required: string[], optional: string[] }> = {
  Identify: { required: [], optional: [] },
  ListMetadataFormats: { required: [], optional: ['identifier'] },
  ListSets: { required: [], optional: ['resumptionToken'] },
  ListIdentifiers: { required: ['metadataPrefix'], optional: ['from', 'until', 'set', 'resumptionToken'] },
  ListRecords: { required: ['metadataPrefix'], optional: ['from', 'until', 'set', 'resumptionToken'] },
  GetRecord: { required: ['identifier', 'metadataPrefix'], optional: [] }
}

export class OaiError extends Error {
  constructor (readonly code: string, message: string) {
    super(message)
  }
}

interface Item {
  datasetId: number
  setSpec: string
  deleted: boolean
  datestamp: Date
  version: typeof schema.datasetVersions.$inferSelect
  conceptDoi: string | null
  labName: string
}

/** Datestamps at the repository's granularity, seconds in UTC (§3.3.1). */
export const oaiDate = (d: Date) => d.toISOString().replace(/\.\d{3}Z$/, 'Z')
// the oai-identifier scheme names the repository by its domain name (no port)
const host = () => new URL(publicUrl('/')).hostname
export const oaiIdentifier = (datasetId: number) => `oai:${host()}:dataset/${datasetId}`

/** Every item, oldest dataset first: the newest version of each dataset that was published or withdrawn. */
async function allItems (): Promise<Item[]> {
  const db = await useDb()
  const v = schema.datasetVersions
  const rows = await db
    .select({ version: v, conceptDoi: schema.datasets.conceptDoi, slug: schema.labs.slug, labName: schema.labs.name })
    .from(v)
    .innerJoin(schema.datasets, eq(schema.datasets.id, v.datasetId))
    .innerJoin(schema.labs, eq(schema.labs.id, schema.datasets.labId))
    .where(
      and(
        inArray(v.state, ['published', 'withdrawn']),
        sql`${v.versionNumber} = (select max(v2.version_number) from dataset_version v2
          where v2.dataset_id = ${v.datasetId} and v2.state in ('published', 'withdrawn'))`
      )
    )
    .orderBy(v.datasetId)
  return rows.map(r => ({
    datasetId: r.version.datasetId,
    setSpec: r.slug,
    deleted: r.version.state === 'withdrawn',
    datestamp: (r.version.state === 'withdrawn' ? r.version.withdrawnAt : r.version.publishedAt) ?? r.version.updatedAt,
    version: r.version,
    conceptDoi: r.conceptDoi,
    labName: r.labName
  }))
}

/** from/until: a day or a second in UTC; both of one granularity, from not after until (§3.3.1, §4.6). */
function parseDate (s: string, name: string, end: boolean): { at: Date, fine: boolean } {
  const m = /^(\d{4})-(\d{2})-(\d{2})(T(\d{2}):(\d{2}):(\d{2})Z)?$/.exec(s)
  const at = m ? new Date(m[4] ? s : `${s}T${end ? '23:59:59.999' : '00:00:00.000'}Z`) : null
  if (!m || !at || Number.isNaN(at.getTime()) || at.toISOString().slice(0, 10) !== s.slice(0, 10))
    throw new OaiError('badArgument', `${name} "${s.slice(0, 40)}" is not a date as YYYY-MM-DD or YYYY-MM-DDThh:mm:ssZ`)
  return { at: m[4] && end ? new Date(at.getTime() + 999) : at, fine: !!m[4] }
}

interface ListRequest {
  metadataPrefix: MetadataPrefix
  from?: string
  until?: string
  set?: string
  offset: number
}
function encodeToken (r: ListRequest): string {
  return Buffer.from(JSON.stringify(r)).toString('base64url')
}
function decodeToken (token: string): ListRequest {
  try {
    if (token.length > 500) throw new Error('too long')
    const r = JSON.parse(Buffer.from(token, 'base64url').toString('utf8')) as ListRequest
    if (!METADATA_FORMATS.some(f => f.prefix === r.metadataPrefix) || !Number.isInteger(r.offset) || r.offset < 0)
      throw new Error('bad')
    for (const k of ['from', 'until', 'set'] as const) if (r[k] !== undefined && typeof r[k] !== 'string') throw new Error('bad')
    return r
  }
  catch {
    throw new OaiError('badResumptionToken', 'The resumption token is not one this repository issued')
  }
}

function checkArgs (args: Record<string, string>): Verb {
  const verb = args.verb
  if (!verb) throw new OaiError('badVerb', 'The verb argument is missing')
  if (!(OAI_VERBS as readonly string[]).includes(verb)) throw new OaiError('badVerb', `"${verb.slice(0, 40)}" is not an OAI-PMH verb`)
  const spec = ARGS[verb as Verb]
  const given = Object.keys(args).filter(k => k !== 'verb')
  for (const k of given) {
    if (!args[k]) throw new OaiError('badArgument', `The argument ${k.slice(0, 40)} is empty`)
  }
  for (const k of given)
    if (![...spec.required, ...spec.optional].includes(k))
      throw new OaiError('badArgument', `${verb} does not take the argument ${k.slice(0, 40)}`)
  if (args.resumptionToken !== undefined) {
    if (given.length > 1) throw new OaiError('badArgument', 'resumptionToken is an exclusive argument')
    return verb as Verb
  }
  for (const k of spec.required) if (!args[k]) throw new OaiError('badArgument', `${verb} needs the argument ${k}`)
  return verb as Verb
}

function formatOf (prefix: string): MetadataPrefix {
  const f = METADATA_FORMATS.find(x => x.prefix === prefix)
  if (!f) throw new OaiError('cannotDisseminateFormat', `The metadata format "${prefix.slice(0, 40)}" is not offered here`)
  return f.prefix
}

function header (i: Item): string {
  return `<header${i.deleted ? ' status="deleted"' : ''}><identifier>${xmlText(oaiIdentifier(i.datasetId))}</identifier>`
    + `<datestamp>${oaiDate(i.datestamp)}</datestamp><setSpec>${xmlText(i.setSpec)}</setSpec></header>`
}
function record (i: Item, prefix: MetadataPrefix): string {
  if (i.deleted) return `<record>${header(i)}</record>` // a deleted record has no metadata (§2.5.1)
  const v = toCitable(i.version, i.conceptDoi, i.labName)
  return `<record>${header(i)}<metadata>${metadataOf(v, prefix)}</metadata></record>`
}

/** Answers one request; `args` are the request's arguments, each given once (the route refuses repeats). */
export async function oaiAnswer (args: Record<string, string>, pageSize: number): Promise<{ request: string, body: string }> {
  const verb = checkArgs(args)
  switch (verb) {
    case 'Identify': {
      const items = await allItems()
      const earliest = items.reduce<Date | null>((m, i) => (!m || i.datestamp < m ? i.datestamp : m), null) ?? new Date(0)
      return {
        request: verb,
        body: `<Identify><repositoryName>Crosspoint</repositoryName><baseURL>${xmlText(publicUrl('/oai'))}</baseURL>`
          + `<protocolVersion>2.0</protocolVersion><adminEmail>${xmlText(useRuntimeConfig().oaiAdminEmail)}</adminEmail>`
          + `<earliestDatestamp>${oaiDate(earliest)}</earliestDatestamp><deletedRecord>persistent</deletedRecord>`
          + '<granularity>YYYY-MM-DDThh:mm:ssZ</granularity></Identify>'
      }
    }
    case 'ListMetadataFormats': {
      if (args.identifier) await itemById(args.identifier)
      return {
        request: verb,
        body: `<ListMetadataFormats>${METADATA_FORMATS.map(f => `<metadataFormat><metadataPrefix>${f.prefix}</metadataPrefix>`
          + `<schema>${f.schema}</schema><metadataNamespace>${f.namespace}</metadataNamespace></metadataFormat>`).join('')}`
          + '</ListMetadataFormats>'
      }
    }
    case 'ListSets': {
      if (args.resumptionToken) throw new OaiError('badResumptionToken', 'ListSets answers in one response; no token was issued')
      const db = await useDb()
      const labs = await db.select().from(schema.labs).orderBy(schema.labs.slug)
      return {
        request: verb,
        body: `<ListSets>${labs.map(l =>
          `<set><setSpec>${xmlText(l.slug)}</setSpec><setName>${xmlText(l.name)}</setName></set>`).join('')}</ListSets>`
      }
    }
    case 'GetRecord': {
      const prefix = formatOf(args.metadataPrefix!)
      const item = await itemById(args.identifier!)
      return { request: verb, body: `<GetRecord>${record(item, prefix)}</GetRecord>` }
    }
    case 'ListIdentifiers':
    case 'ListRecords': {
      const req: ListRequest = args.resumptionToken
        ? decodeToken(args.resumptionToken)
        : { metadataPrefix: formatOf(args.metadataPrefix!), from: args.from, until: args.until, set: args.set, offset: 0 }
      const from = req.from ? parseDate(req.from, 'from', false) : undefined
      const until = req.until ? parseDate(req.until, 'until', true) : undefined
      if (from && until && from.fine !== until.fine) throw new OaiError('badArgument', 'from and until must have the same granularity')
      if (from && until && from.at > until.at) throw new OaiError('badArgument', 'from is later than until')
      const items = (await allItems()).filter(i =>
        (!req.set || i.setSpec === req.set) && (!from || i.datestamp >= from.at) && (!until || i.datestamp <= until.at))
      if (!items.length) throw new OaiError('noRecordsMatch', 'No item matches these arguments')
      if (req.offset >= items.length && args.resumptionToken) throw new OaiError('badResumptionToken', 'The token points past the list')
      const page = items.slice(req.offset, req.offset + pageSize)
      const next = req.offset + page.length
      const token = next < items.length || req.offset > 0
        ? `<resumptionToken completeListSize="${items.length}" cursor="${req.offset}">`
        + `${next < items.length ? encodeToken({ ...req, offset: next }) : ''}</resumptionToken>`
        : ''
      const body = verb === 'ListIdentifiers' ? page.map(header).join('') : page.map(i => record(i, req.metadataPrefix)).join('')
      return { request: verb, body: `<${verb}>${body}${token}</${verb}>` }
    }
  }
}

async function itemById (identifier: string): Promise<Item> {
  const m = /^oai:([^:]+):dataset\/(\d{1,12})$/.exec(identifier)
  const item = m && m[1] === host() ? (await allItems()).find(i => i.datasetId === Number(m[2])) : undefined
  if (!item) throw new OaiError('idDoesNotExist', `"${identifier.slice(0, 80)}" is not an item of this repository`)
  return item
}

/** The whole response document (§3.2): responseDate, the request echoed (its arguments only when valid), the answer. */
export function oaiDocument (args: Record<string, string>, answer: { request: string, body: string } | OaiError): string {
  const ok = !(answer instanceof OaiError)
  // attributes are echoed only for a request without badVerb/badArgument errors (§3.2, "request" element)
  const echo = ok || !['badVerb', 'badArgument'].includes(answer.code)
    ? Object.entries(args).map(([k, v]) => ` ${k}="${xmlText(v)}"`).join('')
    : ''
  const body = ok ? answer.body : `<error code="${answer.code}">${xmlText(answer.message)}</error>`
  return '<?xml version="1.0" encoding="UTF-8"?>\n'
    + '<OAI-PMH xmlns="http://www.openarchives.org/OAI/2.0/" xmlns:xsi="http://www.w3.org/2001/XMLSchema-instance" '
    + 'xsi:schemaLocation="http://www.openarchives.org/OAI/2.0/ http://www.openarchives.org/OAI/2.0/OAI-PMH.xsd">'
    + `<responseDate>${oaiDate(new Date())}</responseDate><request${echo}>${xmlText(publicUrl('/oai'))}</request>${body}</OAI-PMH>\n`
}
