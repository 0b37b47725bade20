/**
 * Sessions end when people expect them to: sign-out, sign out everywhere, a password reset (sessions and
 * API tokens), a role change; reset and sign-in links end each other; the sign-in limit cannot be
 * side-stepped by spelling the address differently. Each copy of a session cookie is tried after the event.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { api, DEMO, lastMailTo, signIn, signInWithLinkToken, signOutOf, startServer, type TestServer } from '../helpers/server'

let s: TestServer
let admin: string
const me = async (cookie: string) => (await api(s.url, '/api/v1/account/profile', { headers: { cookie } })).status
const PASSWORD = 'crosspoint-demo'

beforeAll(async () => {
  s = await startServer({ seed: true })
  admin = await signIn(s.url, DEMO.admin)
}, 90_000)
afterAll(async () => { await s?.stop() })

describe('sessions that end', () => {
  it('signing out ends that session: a kept copy of its cookie is refused', async () => {
    const cookie = await signIn(s.url, DEMO.contributorB)
    const other = await signIn(s.url, DEMO.contributorB)
    expect(await me(cookie)).toBe(200)
    expect(await signOutOf(s.url, cookie)).toBeLessThan(400)
    expect(await me(cookie)).toBe(401)
    expect(await me(other)).toBe(200) // another device's session stands
    const session = await (await fetch(`${s.url}/api/auth/session`, { headers: { cookie } })).json()
    expect(session).toEqual({})
  })
  it('sign out everywhere ends every session of the account', async () => {
    const a = await signIn(s.url, DEMO.contributorB); const b = await signIn(s.url, DEMO.contributorB)
    expect((await api(s.url, '/api/v1/account/sessions/end-all', { method: 'POST', headers: { cookie: a } })).status).toBe(200)
    expect(await me(a)).toBe(401)
    expect(await me(b)).toBe(401)
    expect(await me(await signIn(s.url, DEMO.contributorB))).toBe(200)
  })
  it('a password reset ends old sessions and revokes API tokens', async () => {
    const who = 'sunniva.orrel@lindqvale.example'
    const cookie = await signIn(s.url, who)
    const token = (await api(s.url, '/api/v1/account/tokens', { method: 'POST', headers: { cookie }, json: { name: 'script' } })).data.token
    expect((await api(s.url, '/api/v1/account/profile', { headers: { authorization: `Bearer ${token}` } })).status).toBe(200)
    expect((await api(s.url, '/api/v1/account/password-reset', { method: 'POST', json: { email: who } })).status).toBe(202)
    const link = await lastMailTo(s.url, admin, who)
    const r = await api(s.url, '/api/v1/account/password-reset/confirm', { method: 'POST', json: { token: link.token, password: 'a-brand-new-password' } })
    expect(r.status).toBe(200)
    expect(r.data.message).toMatch(/1 API token was revoked/)
    expect(await me(cookie)).toBe(401)
    expect((await api(s.url, '/api/v1/account/profile', { headers: { authorization: `Bearer ${token}` } })).status).toBe(401)
    expect(await me(await signIn(s.url, who, 'a-brand-new-password'))).toBe(200)
  })
  it('of two reset links the older is dead once a newer one is sent; using a reset link ends sign-in links too', async () => {
    const who = 'kasimir.delacombe@marrowfield.example'
    await api(s.url, '/api/v1/account/password-reset', { method: 'POST', json: { email: who } })
    const first = await lastMailTo(s.url, admin, who)
    await api(s.url, '/api/v1/account/login-link', { method: 'POST', json: { email: who } })
    const signInLink = await lastMailTo(s.url, admin, who)
    await api(s.url, '/api/v1/account/password-reset', { method: 'POST', json: { email: who } })
    const second = await lastMailTo(s.url, admin, who)
    expect(second.token).not.toBe(first.token)
    expect((await api(s.url, '/api/v1/account/password-reset/confirm', { method: 'POST', json: { token: second.token, password: 'another-new-password' } })).status).toBe(200)
    expect((await api(s.url, '/api/v1/account/password-reset/confirm', { method: 'POST', json: { token: first.token, password: 'attackers-password!' } })).status).toBe(410)
    await expect(signInWithLinkToken(s.url, signInLink.token)).rejects.toThrow(/link sign-in failed/)
  })
  it('a role change ends the person\'s sessions (they sign in again with the new role)', async () => {
    const cookie = await signIn(s.url, DEMO.curator)
    const users = (await api(s.url, '/api/v1/admin/users', { headers: { cookie: admin } })).data.items
    const id = users.find((u: { email: string }) => u.email === DEMO.curator).id
    expect((await api(s.url, `/api/v1/admin/users/${id}`, { method: 'PATCH', headers: { cookie: admin }, json: { role: 'contributor' } })).status).toBe(200)
    expect((await api(s.url, '/api/v1/review/queue', { headers: { cookie } })).status).toBe(401)
    await api(s.url, `/api/v1/admin/users/${id}`, { method: 'PATCH', headers: { cookie: admin }, json: { role: 'curator' } })
  })
})

describe('the sign-in limit keys on the address as the account does', () => {
  it('30 wrong guesses in parallel through spacing and case variants meet the limit; the right password is then refused too', async () => {
    const who = DEMO.contributorA
    const variants = (i: number) => [who, ` ${who}`, `${who} `, who.toUpperCase(), `  ${who.replace('i', 'I')}`][i % 5]!
    const outcomes = await Promise.all(Array.from({ length: 30 }, (_, i) => fetch(`${s.url}/api/auth/csrf`).then(async (c) => {
      const { csrfToken } = await c.json() as { csrfToken: string }
      const res = await fetch(`${s.url}/api/auth/callback/credentials`, {
        method: 'POST', redirect: 'manual',
        headers: { 'content-type': 'application/x-www-form-urlencoded', 'cookie': c.headers.getSetCookie().map(x => x.split(';')[0]).join('; ') },
        body: new URLSearchParams({ csrfToken, email: variants(i), password: `wrong-${i}`, json: 'true' })
      })
      return res.status
    })))
    expect(outcomes.filter(st => st === 429).length).toBeGreaterThanOrEqual(20)
    await expect(signIn(s.url, ` ${who}`, PASSWORD)).rejects.toThrow(/sign-in failed/)
  })
})
