/**
 * A page on another origin (here another port of the same host: the same *site*, so SameSite=Lax cookies
 * go along) tries to make a signed-in lab lead invite the attacker, mint an API token and start a new
 * version — by auto-submitted forms (no preflight) and by fetch with credentials. Nothing may happen.
 */
import { createServer, type Server } from 'node:http'
import { createClient } from '@libsql/client'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { DEMO, freePort, startServer, type TestServer } from '../helpers/server'
import { launch, newPage, signInAs } from '../helpers/browser'

let s: TestServer
let browser: Browser
let evil: Server
let evilUrl = ''

beforeAll(async () => {
  [s, browser] = await Promise.all([startServer({ seed: true }), launch()])
  const port = await freePort()
  evilUrl = `http://127.0.0.1:${port}`
  const app = s.url
  const page = `<!doctype html><html><body><h1>Free kinetics poster</h1>
<form id="f1" method="POST" action="${app}/api/v1/labs/1/invitations" enctype="text/plain"><input name='{"email":"attacker@evil.example","x":"' value='"}'></form>
<form id="f2" method="POST" action="${app}/api/v1/account/tokens" enctype="application/x-www-form-urlencoded" target="t2"><input name="name" value="stolen"></form>
<iframe name="t1"></iframe><iframe name="t2"></iframe>
<script>
  window.results = []
  const tries = [
    fetch('${app}/api/v1/account/tokens', { method: 'POST', credentials: 'include', headers: { 'content-type': 'text/plain' }, body: JSON.stringify({ name: 'stolen-by-fetch' }), mode: 'no-cors' }),
    fetch('${app}/api/v1/datasets/1/versions', { method: 'POST', credentials: 'include', mode: 'no-cors' })
  ]
  Promise.allSettled(tries).then(() => { document.getElementById('f1').target = 't1'; document.getElementById('f1').submit(); document.getElementById('f2').submit(); setTimeout(() => { document.title = 'done' }, 1500) })
</script></body></html>`
  evil = createServer((_req, res) => { res.setHeader('content-type', 'text/html'); res.end(page) })
  await new Promise<void>(r => evil.listen(port, '127.0.0.1', r))
}, 90_000)
afterAll(async () => { await browser?.close(); evil?.close(); await s?.stop() })

describe('cross-site request forgery', () => {
  it('a signed-in lead visiting a page on another origin: no invitation, no token, no new version', async () => {
    const db = createClient({ url: s.dbUrl })
    const count = async () => {
      const q = async (sql: string) => Number((await db.execute(sql)).rows[0]!.n)
      return {
        tokens: await q('select count(*) n from api_token'),
        invites: await q('select count(*) n from verificationToken where identifier like \'invite:%\''),
        versions: await q('select count(*) n from dataset_version')
      }
    }
    const before = await count()
    const { page } = await newPage(browser)
    await signInAs(page, s.url, DEMO.contributorA)
    await page.goto(evilUrl)
    await page.waitForFunction(() => document.title === 'done', null, { timeout: 15_000 })
    await page.waitForTimeout(500)
    expect(await count()).toEqual(before)
    db.close()
  })
  it('the same requests from the app\'s own pages still work (Origin is the app)', async () => {
    const { page } = await newPage(browser)
    await signInAs(page, s.url, DEMO.contributorA)
    const status = await page.evaluate(async () => (await fetch('/api/v1/account/tokens', { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ name: 'own page' }) })).status)
    expect(status).toBe(201)
  })
  it('a request naming another origin is refused with 403 before anything else', async () => {
    const r = await fetch(`${s.url}/api/v1/model/curve`, { method: 'POST', headers: { 'origin': 'http://evil.example', 'content-type': 'application/json' }, body: '{}' })
    expect(r.status).toBe(403)
    const r2 = await fetch(`${s.url}/api/v1/model/curve`, { method: 'POST', headers: { 'sec-fetch-site': 'cross-site', 'content-type': 'application/json' }, body: '{}' })
    expect(r2.status).toBe(403)
  })
})
