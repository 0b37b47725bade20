/**
 * Starts the built server (.output) on a free loopback port with a throw-away database file and
 * data folder, optionally seeded with the demo scenario; stops it and removes the files after.
 */
import { spawn, type ChildProcess } from 'node:child_process'
import { mkdtempSync, rmSync } from 'node:fs'
import { createServer } from 'node:net'
import { tmpdir } from 'node:os'
import { join, resolve } from 'node:path'

export const ROOT = resolve(__dirname, '../..')
export const SERVER_ENTRY = join(ROOT, '.output/server/index.mjs')

export async function freePort (): Promise<number> {
  return new Promise((ok, fail) => {
    const s = createServer()
    s.listen(0, '127.0.0.1', () => {
      const port = (s.address() as { port: number }).port
      s.close(() => ok(port))
    })
    s.on('error', fail)
  })
}

export interface TestServer {
  url: string
  dir: string
  dbUrl: string
  env: Record<string, string>
  proc: ChildProcess
  output: () => string
  stop: () => Promise<void>
}

export async function startServer (opts: { seed?: boolean, env?: Record<string, string>, beforeStart?: (dbUrl: string) => Promise<void> } = {}): Promise<TestServer> {
  const dir = mkdtempSync(join(tmpdir(), 'crosspoint-test-'))
  const dbUrl = `file:${join(dir, 'test.db')}`
  if (opts.seed) {
    const { seed } = await import('../../scripts/seed')
    await seed(dbUrl)
  }
  if (opts.beforeStart) await opts.beforeStart(dbUrl)
  const port = await freePort()
  const url = `http://127.0.0.1:${port}`
  const env: Record<string, string> = {
    ...process.env as Record<string, string>,
    NODE_ENV: 'production',
    HOST: '127.0.0.1',
    PORT: String(port),
    NUXT_DATABASE_URL: dbUrl,
    NUXT_DATA_DIR: join(dir, 'files'),
    AUTH_ORIGIN: `${url}/api/auth`,
    NUXT_PUBLIC_BASE_URL: url,
    NUXT_AUTH_SECRET: 'test-secret-' + port,
    ...opts.env
  }
  let out = ''
  // Start from another folder on purpose: the built server must not depend on its working directory.
  const proc = spawn(process.execPath, [SERVER_ENTRY], { cwd: dir, env, stdio: ['ignore', 'pipe', 'pipe'] })
  proc.stdout!.on('data', (d) => { out += d })
  proc.stderr!.on('data', (d) => { out += d })
  const deadline = Date.now() + 30_000
  for (;;) {
    if (proc.exitCode !== null) throw new Error(`server exited with ${proc.exitCode}:\n${out}`)
    try {
      const r = await fetch(`${url}/api/v1/health`)
      if (r.ok) break
    }
    catch { /* not up yet */ }
    if (Date.now() > deadline) throw new Error(`server did not start:\n${out}`)
    await new Promise(r => setTimeout(r, 100))
  }
  return {
    url, dir, dbUrl, env, proc, output: () => out,
    stop: async () => {
      if (proc.exitCode === null) {
        proc.kill('SIGTERM')
        await new Promise(r => proc.once('exit', r))
      }
      rmSync(dir, { recursive: true, force: true })
    }
  }
}

/** JSON request helper: returns status and parsed body. */
export async function api (base: string, path: string, init: RequestInit & { json?: unknown } = {}) {
  const headers = new Headers(init.headers)
  let body = init.body
  if (init.json !== undefined) { headers.set('content-type', 'application/json'); body = JSON.stringify(init.json) }
  const res = await fetch(base + path, { ...init, headers, body, redirect: 'manual' })
  const text = await res.text()
  let data: any = text
  try { data = JSON.parse(text) }
  catch { /* not JSON */ }
  return { status: res.status, headers: res.headers, data }
}

/** Signs in through the auth handler's credentials flow like a browser would; returns the Cookie header. */
export async function signIn (base: string, email: string, password = 'crosspoint-demo'): Promise<string> {
  const jar = new Map<string, string>()
  const keep = (res: Response) => {
    for (const c of res.headers.getSetCookie()) {
      const [pair] = c.split(';'); const i = pair!.indexOf('=')
      jar.set(pair!.slice(0, i), pair!.slice(i + 1))
    }
  }
  const cookie = () => [...jar].map(([k, v]) => `${k}=${v}`).join('; ')
  const csrfRes = await fetch(`${base}/api/auth/csrf`)
  keep(csrfRes)
  const { csrfToken } = await csrfRes.json() as { csrfToken: string }
  const res = await fetch(`${base}/api/auth/callback/credentials`, {
    method: 'POST', redirect: 'manual',
    headers: { 'content-type': 'application/x-www-form-urlencoded', 'cookie': cookie() },
    body: new URLSearchParams({ csrfToken, email, password, callbackUrl: base, json: 'true' })
  })
  keep(res)
  if (![...jar.keys()].some(k => k.includes('session-token'))) throw new Error(`sign-in failed for ${email}: ${res.status}`)
  return cookie()
}

/** Signs in with the one-time token of an e-mailed link; returns the Cookie header. */
export async function signInWithLinkToken (base: string, linkToken: string): Promise<string> {
  const csrfRes = await fetch(`${base}/api/auth/csrf`)
  const csrfCookie = csrfRes.headers.getSetCookie().map(c => c.split(';')[0]).join('; ')
  const { csrfToken } = await csrfRes.json() as { csrfToken: string }
  const res = await fetch(`${base}/api/auth/callback/credentials`, {
    method: 'POST', redirect: 'manual',
    headers: { 'content-type': 'application/x-www-form-urlencoded', 'cookie': csrfCookie },
    body: new URLSearchParams({ csrfToken, linkToken, callbackUrl: base, json: 'true' })
  })
  const cookies = res.headers.getSetCookie().map(c => c.split(';')[0])
  if (!cookies.some(c => c!.includes('session-token'))) throw new Error(`link sign-in failed: ${res.status}`)
  return [csrfCookie, ...cookies].join('; ')
}

/** The newest mail to an address (read through the admin outbox), and the first link in it. */
/**
 * The newest mail to `to` once its send has finished. Account mail is sent after a neutral-timed answer
 * (server/utils/accounts/accounts.ts), so it may still be queued when the request returns: wait up to 15 s.
 */
export async function lastMailTo (base: string, adminCookie: string, to: string) {
  const until = Date.now() + 15_000
  for (;;) {
    const r = await api(base, '/api/v1/admin/outbox', { headers: { cookie: adminCookie } })
    const m = (r.data.items as { to: string, subject: string, text: string, status: string }[]).find(x => x.to === to)
    if (m && m.status !== 'queued') {
      const link = m.text.match(/https?:\/\/\S+/)?.[0] ?? ''
      return { ...m, link, token: link ? new URL(link).searchParams.get('token') ?? '' : '' }
    }
    if (Date.now() > until) throw new Error(m ? `mail to ${to} still queued after 15 s` : `no mail to ${to}`)
    await new Promise(resolve => setTimeout(resolve, 100))
  }
}

export const DEMO = {
  contributorA: 'imre.faulkwood@brightwater.example',
  contributorB: 'sunniva.orrel@lindqvale.example',
  contributorC: 'kasimir.delacombe@marrowfield.example',
  curator: 'pia.veldhaus@brightwater.example',
  curatorB: 'ansel.moravec@lindqvale.example',
  admin: 'rowan.tessaly@crosspoint.example'
}

/** Signs out like the browser does (next-auth's sign-out form with its CSRF token); returns the status. */
export async function signOutOf (base: string, cookie: string): Promise<number> {
  const csrf = await (await fetch(`${base}/api/auth/csrf`, { headers: { cookie } })).json() as { csrfToken: string }
  const res = await fetch(`${base}/api/auth/signout`, {
    method: 'POST', redirect: 'manual',
    headers: { 'content-type': 'application/x-www-form-urlencoded', cookie },
    body: new URLSearchParams({ csrfToken: csrf.csrfToken, callbackUrl: base, json: 'true' })
  })
  return res.status
}
