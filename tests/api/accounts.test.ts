import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { createClient } from '@libsql/client'
import { api, DEMO, lastMailTo, signIn, signInWithLinkToken, startServer, type TestServer } from '../helpers/server'

let s: TestServer
let admin: string
beforeAll(async () => {
  s = await startServer({ seed: true })
  admin = await signIn(s.url, DEMO.admin)
})
afterAll(async () => { await s?.stop() })

describe('sign-up, confirmation, sign-in', () => {
  const email = 'new.person@example.org'
  const password = 'a-long-enough-password'
  it('refuses bad fields, naming each', async () => {
    const r = await api(s.url, '/api/v1/account/signup', { method: 'POST', json: { name: '', email: 'not-an-address', password: 'short' } })
    expect(r.status).toBe(422)
    expect(r.data.data.issues.map((i: { path: string }) => i.path).sort()).toEqual(['/email', '/name', '/password'])
  })
  it('creates the account, mails a confirmation link, and only then lets the person sign in', async () => {
    const r = await api(s.url, '/api/v1/account/signup', { method: 'POST', json: { name: 'New Person', email, password } })
    expect(r.status).toBe(202)
    await expect(signIn(s.url, email, password)).rejects.toThrow(/sign-in failed/)
    const mail = await lastMailTo(s.url, admin, email)
    expect(mail.subject).toBe('Confirm your e-mail address for Crosspoint')
    expect(mail.status).toBe('sent') // went through the local SMTP sink
    expect(mail.link).toMatch(new RegExp(`^${s.url}/verify\\?token=`))
    const v = await api(s.url, '/api/v1/account/verify', { method: 'POST', json: { token: mail.token } })
    expect(v.status).toBe(200)
    expect((await api(s.url, '/api/v1/account/verify', { method: 'POST', json: { token: mail.token } })).status).toBe(410)
    const cookie = await signIn(s.url, email, password)
    const me = await api(s.url, '/api/v1/me', { headers: { cookie } })
    expect(me.data.user).toMatchObject({ email, role: 'contributor', labIds: [] })
  })
  it('a second sign-up with the same address answers like a new one (no account oracle) and tells the owner by mail', async () => {
    const fresh = await api(s.url, '/api/v1/account/signup', { method: 'POST', json: { name: 'Someone New', email: 'someone.new@example.org', password } })
    const again = await api(s.url, '/api/v1/account/signup', { method: 'POST', json: { name: 'Again', email: ` ${email.toUpperCase()}`.trim(), password } })
    expect(again.status).toBe(fresh.status)
    expect(again.data.message).toBe(fresh.data.message)
    expect((await lastMailTo(s.url, admin, email)).subject).toBe('Someone tried to create a Crosspoint account with your address')
  })
  it('known and unknown addresses take the same time to answer (reset, sign-in link, sign-up)', async () => {
    // 2 of each, interleaved (the per-address limits allow 5 in 15 minutes); within 50 ms of each other (before: 112 ms against 3 ms)
    const median = (xs: number[]) => xs.sort((a, b) => a - b)[Math.floor(xs.length / 2)]!
    for (const [path, body] of [['/api/v1/account/password-reset', (e: string) => ({ email: e })], ['/api/v1/account/login-link', (e: string) => ({ email: e })]] as const) {
      const known: number[] = []; const unknown: number[] = []
      for (let i = 0; i < 2; i++) {
        for (const [list, e] of [[known, email], [unknown, `nobody${i}@example.org`]] as const) {
          const t = performance.now(); const r = await api(s.url, path, { method: 'POST', json: body(e) }); list.push(performance.now() - t)
          expect(r.status).toBe(202)
        }
      }
      expect(Math.abs(Math.max(...known) - Math.max(...unknown))).toBeLessThan(50)
      expect(Math.abs(median(known) - median(unknown))).toBeLessThan(50)
    }
  })
  it('signs in by e-mailed link, once', async () => {
    expect((await api(s.url, '/api/v1/account/login-link', { method: 'POST', json: { email } })).status).toBe(202)
    expect((await api(s.url, '/api/v1/account/login-link', { method: 'POST', json: { email: 'nobody@example.org' } })).status).toBe(202)
    const mail = await lastMailTo(s.url, admin, email)
    expect(mail.subject).toBe('Your Crosspoint sign-in link')
    const cookie = await signInWithLinkToken(s.url, mail.token)
    expect((await api(s.url, '/api/v1/me', { headers: { cookie } })).data.user.email).toBe(email)
    await expect(signInWithLinkToken(s.url, mail.token)).rejects.toThrow(/link sign-in failed/)
  })
  it('resets the password through the mailed link; the old one stops working', async () => {
    await api(s.url, '/api/v1/account/password-reset', { method: 'POST', json: { email } })
    const mail = await lastMailTo(s.url, admin, email)
    const r = await api(s.url, '/api/v1/account/password-reset/confirm', { method: 'POST', json: { token: mail.token, password: 'another-long-password' } })
    expect(r.status).toBe(200)
    await expect(signIn(s.url, email, password)).rejects.toThrow()
    expect(await signIn(s.url, email, 'another-long-password')).toContain('session-token')
  })
  it('checks the ORCID iD check character on the profile', async () => {
    const cookie = await signIn(s.url, DEMO.contributorC)
    const bad = await api(s.url, '/api/v1/account/profile', { method: 'PATCH', headers: { cookie }, json: { orcid: '0000-0002-1825-0098' } })
    expect(bad.status).toBe(422)
    expect(bad.data.data.issues[0].path).toBe('/orcid')
    const good = await api(s.url, '/api/v1/account/profile', { method: 'PATCH', headers: { cookie }, json: { orcid: 'https://orcid.org/0000-0002-1825-0097', affiliation: 'Somewhere (fictional)' } })
    expect(good.status).toBe(200)
    expect((await api(s.url, '/api/v1/account/profile', { headers: { cookie } })).data.orcid).toBe('0000-0002-1825-0097')
  })
})

describe('secrets at rest and repeated failures', () => {
  it('API tokens: shown once, stored hashed, accepted as Bearer, last use recorded, revocable', async () => {
    const cookie = await signIn(s.url, DEMO.contributorA)
    const created = await api(s.url, '/api/v1/account/tokens', { method: 'POST', headers: { cookie }, json: { name: 'my script' } })
    expect(created.status).toBe(201)
    const token = created.data.token as string
    expect(token).toMatch(/^cpt_/)
    const me = await api(s.url, '/api/v1/me', { headers: { authorization: `Bearer ${token}` } })
    expect(me.data.user.email).toBe(DEMO.contributorA)
    const list = await api(s.url, '/api/v1/account/tokens', { headers: { cookie } })
    expect(list.data.items[0].lastUsedAt).not.toBeNull()
    expect(JSON.stringify(list.data)).not.toContain(token)
    const db = createClient({ url: s.dbUrl })
    const dump = JSON.stringify((await db.execute('select * from api_token')).rows)
    expect(dump).not.toContain(token)
    expect(dump).toContain(created.data.prefix)
    db.close()
    expect((await api(s.url, `/api/v1/account/tokens/${created.data.id}`, { method: 'DELETE', headers: { cookie } })).status).toBe(200)
    expect((await api(s.url, '/api/v1/me', { headers: { authorization: `Bearer ${token}` } })).status).toBe(401)
  })
  it('no password is stored in clear: every stored one is an argon2id hash', async () => {
    const db = createClient({ url: s.dbUrl })
    const rows = (await db.execute('select * from user')).rows
    for (const r of rows) {
      expect(String(r.password_hash)).toMatch(/^\$argon2id\$v=19\$/)
      expect(JSON.stringify(r)).not.toContain('crosspoint-demo')
    }
    db.close()
  })
  it('repeated wrong passwords for one account end in 429 with Retry-After', async () => {
    let last = 0; let retry: string | null = null
    for (let i = 0; i < 11; i++) {
      const csrf = await fetch(`${s.url}/api/auth/csrf`)
      const cookie = csrf.headers.getSetCookie().map(c => c.split(';')[0]).join('; ')
      const { csrfToken } = await csrf.json() as { csrfToken: string }
      const r = await fetch(`${s.url}/api/auth/callback/credentials`, {
        method: 'POST', redirect: 'manual', headers: { 'content-type': 'application/x-www-form-urlencoded', cookie },
        body: new URLSearchParams({ csrfToken, email: DEMO.contributorC, password: `wrong-${i}`, json: 'true' })
      })
      last = r.status; retry = r.headers.get('retry-after')
    }
    expect(last).toBe(429)
    expect(Number(retry)).toBeGreaterThan(0)
  }, 60_000)
  it('a new X-Forwarded-For on every attempt does not undo the limit (the header is not trusted by default)', async () => {
    const statuses: number[] = []
    for (let i = 0; i < 11; i++) {
      const csrf = await fetch(`${s.url}/api/auth/csrf`)
      const cookie = csrf.headers.getSetCookie().map(c => c.split(';')[0]).join('; ')
      const { csrfToken } = await csrf.json() as { csrfToken: string }
      const r = await fetch(`${s.url}/api/auth/callback/credentials`, {
        method: 'POST', redirect: 'manual', headers: { 'content-type': 'application/x-www-form-urlencoded', cookie, 'x-forwarded-for': `198.51.100.${i + 1}` },
        body: new URLSearchParams({ csrfToken, email: DEMO.curator, password: `wrong-${i}`, json: 'true' })
      })
      statuses.push(r.status)
    }
    expect(statuses.slice(0, 10)).not.toContain(429)
    expect(statuses[10]).toBe(429)
  }, 60_000)
})

describe('labs, invitations and roles', () => {
  it('a lab lead invites by e-mail; the invitee accepts and becomes a member; all of it is audited', async () => {
    const lead = await signIn(s.url, DEMO.contributorA)
    const labId = (await api(s.url, '/api/v1/me', { headers: { cookie: lead } })).data.user.labIds[0]
    const invitee = 'invited.person@example.org'
    expect((await api(s.url, `/api/v1/labs/${labId}/invitations`, { method: 'POST', headers: { cookie: lead }, json: { email: invitee } })).status).toBe(202)
    const inv = await lastMailTo(s.url, admin, invitee)
    expect(inv.subject).toBe('Invitation to join Faulkwood Ultrafast Lab on Crosspoint')
    await api(s.url, '/api/v1/account/signup', { method: 'POST', json: { name: 'Invited Person', email: invitee, password: 'a-long-enough-password' } })
    await api(s.url, '/api/v1/account/verify', { method: 'POST', json: { token: (await lastMailTo(s.url, admin, invitee)).token } })
    const cookie = await signIn(s.url, invitee, 'a-long-enough-password')
    // someone else cannot use it
    const other = await signIn(s.url, DEMO.contributorB)
    expect((await api(s.url, '/api/v1/account/invitations/accept', { method: 'POST', headers: { cookie: other }, json: { token: inv.token } })).status).toBe(403)
    // the refused attempt did not use up the invitation
    const ok = await api(s.url, '/api/v1/account/invitations/accept', { method: 'POST', headers: { cookie }, json: { token: inv.token } })
    expect(ok.status).toBe(200)
    expect(ok.data.joined.name).toBe('Faulkwood Ultrafast Lab')
    const members = (await api(s.url, `/api/v1/labs/${labId}`, { headers: { cookie: lead } })).data.members.map((m: { email: string }) => m.email)
    expect(members).toContain(invitee)
    const userId = (await api(s.url, '/api/v1/me', { headers: { cookie } })).data.user.id
    expect((await api(s.url, `/api/v1/labs/${labId}/members/${userId}`, { method: 'DELETE', headers: { cookie: lead } })).status).toBe(200)
    const log = (await api(s.url, '/api/v1/admin/audit', { headers: { cookie: admin } })).data.items.map((a: { action: string }) => a.action)
    expect(log).toEqual(expect.arrayContaining(['lab.invited', 'lab.member-added', 'lab.member-removed']))
  })
  it('an admin changes a role; the change is audited and takes effect at once', async () => {
    const users = (await api(s.url, '/api/v1/admin/users', { headers: { cookie: admin } })).data.items
    const target = users.find((u: { email: string }) => u.email === 'new.person@example.org')
    expect((await api(s.url, `/api/v1/admin/users/${target.id}`, { method: 'PATCH', headers: { cookie: admin }, json: { role: 'curator' } })).status).toBe(200)
    const cookie = await signIn(s.url, 'new.person@example.org', 'another-long-password')
    expect((await api(s.url, '/api/v1/me', { headers: { cookie } })).data.user.role).toBe('curator')
    const log = (await api(s.url, '/api/v1/admin/audit', { headers: { cookie: admin } })).data.items
    expect(log.find((a: { action: string, targetId: string }) => a.action === 'user.role-changed' && a.targetId === target.id).detail).toEqual({ from: 'contributor', to: 'curator' })
    expect((await api(s.url, `/api/v1/admin/users/${target.id}`, { method: 'PATCH', headers: { cookie: admin }, json: { role: 'wizard' } })).status).toBe(422)
  })
})

describe('security headers', () => {
  it('pages carry a Content-Security-Policy with a nonce that every inline script uses', async () => {
    const r = await fetch(s.url + '/')
    const csp = r.headers.get('content-security-policy')!
    expect(csp).toContain('object-src \'none\'')
    expect(csp).toContain('frame-ancestors \'none\'')
    const nonce = csp.match(/'nonce-([^']+)'/)![1]
    const html = await r.text()
    const scripts = html.match(/<script\b[^>]*>/g) ?? []
    expect(scripts.length).toBeGreaterThan(0)
    for (const tag of scripts) if (!/type="application\/json"/.test(tag) && !/\bsrc=/.test(tag)) expect(tag).toContain(`nonce="${nonce}"`)
    expect(r.headers.get('x-content-type-options')).toBe('nosniff')
  })
})

describe('behind a declared reverse proxy (NUXT_TRUST_PROXY=1)', () => {
  let p: TestServer
  beforeAll(async () => { p = await startServer({ env: { NUXT_TRUST_PROXY: '1' } }) })
  afterAll(async () => { await p?.stop() })
  it('limits count per forwarded address: one address is stopped, another is not', async () => {
    const ask = (from: string) => api(p.url, '/api/v1/account/login-link', { method: 'POST', headers: { 'x-forwarded-for': from }, json: { email: 'someone@example.org' } })
    const fromA: number[] = []
    for (let i = 0; i < 6; i++) fromA.push((await ask('203.0.113.7')).status)
    expect(fromA.slice(0, 5)).toEqual([202, 202, 202, 202, 202])
    expect(fromA[5]).toBe(429)
    expect((await ask('203.0.113.8')).status).toBe(202)
  })
})
