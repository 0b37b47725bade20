/**
 * Identifier registrar over HTTP, in the shape of a DataCite-like REST subset (JSON:API bodies at
 * /dois). With NUXT_REGISTRAR_URL unset the app starts a local fake on a loopback port and talks to
 * it with the same client. Identifiers are deterministic per dataset and version, and the client
 * asks before it creates, so a retry after a failure never mints a second identifier.
 */
import { createServer, type Server } from 'node:http'

/** DataCite's states: a draft can be changed or deleted and is not public; findable resolves and is indexed. */
type DoiState = 'draft' | 'registered' | 'findable'
interface DoiRecord {
  doi: string
  url: string
  attributes: Record<string, unknown>
  createdAt: string
  state: DoiState
}

// ── the local fake ───────────────────────────────────────────────────────────────────────
const fake = {
  server: undefined as Server | undefined,
  url: '',
  dois: new Map<string, DoiRecord>(),
  failNext: 0,
  failPublishNext: 0,
  requests: 0
}

async function startFake (): Promise<string> {
  if (fake.url) return fake.url
  fake.server = createServer((req, res) => {
    let body = ''
    req.on('data', (c) => {
      body += c
    })
    req.on('end', () => {
      fake.requests++
      const send = (status: number, data: unknown) => {
        res.writeHead(status, { 'content-type': 'application/vnd.api+json' })
        res.end(JSON.stringify(data))
      }
      const path = decodeURIComponent((req.url ?? '').split('?')[0]!)
      if (fake.failNext > 0 && path.startsWith('/dois')) {
        fake.failNext--
        return send(503, { errors: [{ status: '503', title: 'Registrar unavailable (simulated)' }] })
      }
      if (req.method === 'GET' && path.startsWith('/dois/')) {
        const d = fake.dois.get(path.slice(6).toLowerCase())
        return d
          ? send(200, {
              data: { id: d.doi, type: 'dois', attributes: { ...d.attributes, doi: d.doi, url: d.url, state: d.state } }
            })
          : send(404, { errors: [{ status: '404', title: 'DOI not found' }] })
      }
      if (req.method === 'POST' && path === '/dois') {
        let parsed: { data?: { attributes?: Record<string, unknown> } }
        try {
          parsed = JSON.parse(body)
        }
        catch {
          return send(400, { errors: [{ status: '400', title: 'Body is not JSON' }] })
        }
        const a = parsed.data?.attributes ?? {}
        const doi = String(a.doi ?? '').toLowerCase()
        if (!/^10\.\d{4,9}\/\S+$/.test(doi) || !a.url)
          return send(422, { errors: [{ status: '422', title: 'doi and url are required' }] })
        if (fake.dois.has(doi))
          return send(422, { errors: [{ status: '422', title: 'This DOI has already been taken' }] })
        const state: DoiState = a.event === 'publish' ? 'findable' : a.event === 'register' ? 'registered' : 'draft'
        const { event: _event, ...stored } = a
        fake.dois.set(doi, { doi, url: String(a.url), attributes: stored, createdAt: new Date().toISOString(), state })
        return send(201, { data: { id: doi, type: 'dois', attributes: { ...stored, state } } })
      }
      if (req.method === 'PUT' && path.startsWith('/dois/')) {
        const d = fake.dois.get(path.slice(6).toLowerCase())
        if (!d) return send(404, { errors: [{ status: '404', title: 'DOI not found' }] })
        let a: Record<string, unknown>
        try {
          a = JSON.parse(body).data?.attributes ?? {}
        }
        catch {
          return send(400, { errors: [{ status: '400', title: 'Body is not JSON' }] })
        }
        if (a.event === 'publish' && fake.failPublishNext > 0) {
          fake.failPublishNext--
          return send(503, { errors: [{ status: '503', title: 'Registrar unavailable (simulated)' }] })
        }
        const { event, ...rest } = a
        Object.assign(d.attributes, rest)
        if (typeof rest.url === 'string') d.url = rest.url
        if (event === 'publish') d.state = 'findable'
        else if (event === 'hide' && d.state === 'findable') d.state = 'registered'
        return send(200, { data: { id: d.doi, type: 'dois', attributes: { ...d.attributes, state: d.state } } })
      }
      send(404, { errors: [{ status: '404', title: 'Not found' }] })
    })
  })
  await new Promise<void>(r => fake.server!.listen(0, '127.0.0.1', () => r()))
  fake.url = `http://127.0.0.1:${(fake.server!.address() as { port: number }).port}`
  return fake.url
}

/** The local fake's state, for the admin page and tests (null when a real registrar is configured). */
export function localRegistrarState () {
  return registrarUrl()
    ? null
    : {
        url: fake.url,
        minted: [...fake.dois.values()].map(d => ({ doi: d.doi, url: d.url, createdAt: d.createdAt, state: d.state })),
        failNext: fake.failNext,
        failPublishNext: fake.failPublishNext
      }
}
/** Makes the local fake answer the next n identifier requests with 503 (or only the next n "publish" events). */
export function failLocalRegistrar (n: number, only?: 'publish'): void {
  if (only === 'publish') fake.failPublishNext = n
  else fake.failNext = n
}

// ── the client ───────────────────────────────────────────────────────────────────────────
function registrarUrl (): string {
  try {
    return useRuntimeConfig().registrarUrl
  }
  catch {
    return process.env.NUXT_REGISTRAR_URL ?? ''
  }
}
export function registrarPrefix (): string {
  try {
    return useRuntimeConfig().registrarPrefix
  }
  catch {
    return process.env.NUXT_REGISTRAR_PREFIX ?? '10.99999'
  }
}

export class RegistrarError extends Error {}

async function base (): Promise<string> {
  return registrarUrl() || startFake()
}

async function request (method: string, path: string, idempotencyKey: string, body?: unknown): Promise<Response> {
  const b = await base()
  try {
    return await fetch(b + path, {
      method,
      headers: { 'content-type': 'application/vnd.api+json', 'idempotency-key': idempotencyKey },
      body: body ? JSON.stringify(body) : undefined,
      signal: AbortSignal.timeout(10_000)
    })
  }
  catch (e) {
    throw new RegistrarError(`The identifier registrar cannot be reached (${(e as Error).message})`)
  }
}

/**
 * Reserves the DOI as a draft (not public, not resolvable) unless it exists, in which case only its metadata
 * is updated and its state kept. Returns true if it was created now. Publication makes it findable only
 * after the database has committed (see makeFindable), so a crash or a lost race never leaves a public
 * identifier for something that was not published.
 */
export async function ensureDraftDoi (doi: string, url: string, attributes: Record<string, unknown>): Promise<boolean> {
  const path = `/dois/${encodeURIComponent(doi)}`
  const existing = await request('GET', path, doi)
  if (existing.status === 200) {
    const put = await request('PUT', path, doi, { data: { type: 'dois', attributes: { ...attributes, url } } })
    if (!put.ok) throw new RegistrarError(`The registrar refused to update ${doi} (${put.status})`)
    return false
  }
  if (existing.status !== 404) throw new RegistrarError(`The identifier registrar answered ${existing.status}`)
  const res = await request('POST', '/dois', doi, { data: { type: 'dois', attributes: { ...attributes, doi, url } } })
  if (res.status === 201) return true
  // Someone reserved it between our look-up and our request (two curators at once): that is the same identifier.
  if (res.status === 422 && (await request('GET', path, doi)).status === 200) return false
  throw new RegistrarError(`The identifier registrar answered ${res.status} for ${doi}`)
}

/** Makes a reserved DOI findable (DataCite's "publish" event). Safe to repeat. */
export async function makeFindable (doi: string): Promise<void> {
  const put = await request('PUT', `/dois/${encodeURIComponent(doi)}`, `${doi}|publish`, {
    data: { type: 'dois', attributes: { event: 'publish' } }
  })
  if (!put.ok) throw new RegistrarError(`The registrar did not make ${doi} findable (${put.status})`)
}

/** The registrar's state of a DOI, or null when it does not know it. */
export async function doiState (doi: string): Promise<string | null> {
  const r = await request('GET', `/dois/${encodeURIComponent(doi)}`, doi)
  if (r.status === 404) return null
  if (!r.ok) throw new RegistrarError(`The identifier registrar answered ${r.status}`)
  return ((await r.json()) as { data?: { attributes?: { state?: string } } }).data?.attributes?.state ?? null
}
