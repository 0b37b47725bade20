/**
 * Who may do what: every role × every route, asserting the status the permission table in
 * the README's "What each role can do" table says. Another lab's unpublished rows answer 404, never 403.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { api, DEMO, lastMailTo, signIn, startServer, type TestServer } from '../helpers/server'

type Role = 'visitor' | 'contributorA' | 'contributorB' | 'curatorOfA' | 'curatorElsewhere' | 'admin' | 'tokenOfA'
const ROLES: Role[] = ['visitor', 'contributorA', 'contributorB', 'curatorOfA', 'curatorElsewhere', 'admin', 'tokenOfA']

let s: TestServer
const auth: Record<Role, Record<string, string>> = {} as never
const ids = { draftA: 3, publishedA: 2, returnedB: 7, submittedC: 11, withdrawnC: 10, labA: 0, solvent: 1, publishedRecord: 0 }

beforeAll(async () => {
  s = await startServer({ seed: true })
  const admin = await signIn(s.url, DEMO.admin)
  // a second curator, in no lab
  await api(s.url, '/api/v1/account/signup', { method: 'POST', json: { name: 'Other Curator', email: 'other.curator@example.org', password: 'a-long-enough-password' } })
  await api(s.url, '/api/v1/account/verify', { method: 'POST', json: { token: (await lastMailTo(s.url, admin, 'other.curator@example.org')).token } })
  const users = (await api(s.url, '/api/v1/admin/users', { headers: { cookie: admin } })).data.items
  await api(s.url, `/api/v1/admin/users/${users.find((u: { email: string }) => u.email === 'other.curator@example.org').id}`, { method: 'PATCH', headers: { cookie: admin }, json: { role: 'curator' } })
  const a = await signIn(s.url, DEMO.contributorA)
  const token = (await api(s.url, '/api/v1/account/tokens', { method: 'POST', headers: { cookie: a }, json: { name: 'matrix' } })).data.token
  Object.assign(auth, {
    visitor: {},
    contributorA: { cookie: a },
    contributorB: { cookie: await signIn(s.url, DEMO.contributorB) },
    curatorOfA: { cookie: await signIn(s.url, DEMO.curator) },
    curatorElsewhere: { cookie: await signIn(s.url, 'other.curator@example.org', 'a-long-enough-password') },
    admin: { cookie: admin },
    tokenOfA: { authorization: `Bearer ${token}` }
  })
  ids.labA = (await api(s.url, '/api/v1/me', { headers: { cookie: a } })).data.user.labIds[0]
  ids.publishedRecord = (await api(s.url, '/api/v1/records?pageSize=1')).data.items[0].id
  // the fixture ids must be in the states the table assumes
  const all = (await api(s.url, '/api/v1/datasets?pageSize=100', { headers: { cookie: admin } })).data.items
  const state = (id: number) => all.find((d: { id: number }) => d.id === id)?.state
  expect([state(ids.draftA), state(ids.publishedA), state(ids.returnedB), state(ids.submittedC), state(ids.withdrawnC)]).toEqual(['draft', 'published', 'returned', 'submitted', 'withdrawn'])
}, 90_000)
afterAll(async () => { await s?.stop() })

interface Case { name: string, method: string, path: () => string, body?: (r: Role) => unknown, expect: Record<Role, number> }
const all = (n: number): Record<Role, number> => Object.fromEntries(ROLES.map(r => [r, n])) as never
const signedIn = (n: number): Record<Role, number> => ({ ...all(n), visitor: 401 })
const adminOnly = (created = 200): Record<Role, number> => ({ ...all(403), visitor: 401, admin: created })

const CASES: Case[] = [
  { name: 'health', method: 'GET', path: () => '/api/v1/health', expect: all(200) },
  { name: 'search records', method: 'GET', path: () => '/api/v1/records?pageSize=1', expect: all(200) },
  { name: 'model curve', method: 'POST', path: () => '/api/v1/model/curve', body: () => ({ model: 'classical', temperatureK: 300, lambdaTotal: 1, coupling: 0.01, drivingForces: [0] }), expect: all(200) },
  { name: 'model fit', method: 'POST', path: () => '/api/v1/model/fit', body: () => ({ model: 'classical', temperatureK: 300, points: [{ deltaG: -1, log10Rate: 9 }, { deltaG: -0.5, log10Rate: 10 }, { deltaG: 0, log10Rate: 8 }] }), expect: all(200) },
  { name: 'published dataset', method: 'GET', path: () => `/api/v1/datasets/${ids.publishedA}`, expect: all(200) },
  { name: 'withdrawn dataset (tombstone)', method: 'GET', path: () => `/api/v1/datasets/${ids.withdrawnC}`, expect: all(200) },
  { name: 'draft of lab A', method: 'GET', path: () => `/api/v1/datasets/${ids.draftA}`,
    expect: { visitor: 404, contributorA: 200, contributorB: 404, curatorOfA: 200, curatorElsewhere: 404, admin: 200, tokenOfA: 200 } },
  { name: 'returned dataset of lab B', method: 'GET', path: () => `/api/v1/datasets/${ids.returnedB}`,
    expect: { visitor: 404, contributorA: 404, contributorB: 200, curatorOfA: 404, curatorElsewhere: 404, admin: 200, tokenOfA: 404 } },
  { name: 'submitted dataset of lab C', method: 'GET', path: () => `/api/v1/datasets/${ids.submittedC}`,
    expect: { visitor: 404, contributorA: 404, contributorB: 404, curatorOfA: 200, curatorElsewhere: 200, admin: 200, tokenOfA: 404 } },
  { name: 'lab page', method: 'GET', path: () => `/api/v1/labs/${ids.labA}`, expect: all(200) },
  { name: 'me', method: 'GET', path: () => '/api/v1/me', expect: all(200) },
  { name: 'profile', method: 'GET', path: () => '/api/v1/account/profile', expect: signedIn(200) },
  { name: 'token list', method: 'GET', path: () => '/api/v1/account/tokens', expect: signedIn(200) },
  { name: 'invite to lab A', method: 'POST', path: () => `/api/v1/labs/${ids.labA}/invitations`, body: r => ({ email: `guest.${r.toLowerCase()}@example.org` }),
    expect: { visitor: 401, contributorA: 202, contributorB: 404, curatorOfA: 403, curatorElsewhere: 404, admin: 202, tokenOfA: 202 } },
  { name: 'remove a non-member from lab A', method: 'DELETE', path: () => `/api/v1/labs/${ids.labA}/members/nobody`,
    expect: { visitor: 401, contributorA: 404, contributorB: 404, curatorOfA: 403, curatorElsewhere: 404, admin: 404, tokenOfA: 404 } },
  // the solvent table is the admins' (the README's permission table)
  { name: 'edit a solvent', method: 'PATCH', path: () => `/api/v1/solvents/${ids.solvent}`, body: () => ({ source: 'handbook value, from memory' }),
    expect: { ...all(403), visitor: 401, admin: 200 } },
  { name: 'shared systems', method: 'GET', path: () => '/api/v1/systems', expect: all(200) },
  { name: 'species synonyms', method: 'GET', path: () => '/api/v1/species-synonyms', expect: all(200) },
  { name: 'add a species synonym', method: 'POST', path: () => '/api/v1/species-synonyms', body: r => ({ alias: `alias for ${r}`, canonical: 'ZnP' }),
    expect: { visitor: 401, contributorA: 403, contributorB: 403, curatorOfA: 201, curatorElsewhere: 201, admin: 201, tokenOfA: 403 } },
  { name: 'add a solvent', method: 'POST', path: () => '/api/v1/solvents', body: r => ({ name: `test solvent ${r}`, permittivity: 10, refractiveIndex: 1.4, source: 'invented for a test' }),
    expect: { ...all(403), visitor: 401, admin: 201 } },
  { name: 'derivation report', method: 'GET', path: () => '/api/v1/review/derivations', expect: { ...all(403), visitor: 401, curatorOfA: 200, curatorElsewhere: 200, admin: 200 } },
  // nothing differs in the demo's published data: curators get 409, the dataset's own lab's curator 403
  { name: 'start a derivation correction', method: 'POST', path: () => `/api/v1/review/derivations/${ids.publishedA}`,
    expect: { ...all(403), visitor: 401, curatorOfA: 403, curatorElsewhere: 409, admin: 409 } },
  { name: 'create a lab', method: 'POST', path: () => '/api/v1/labs', body: r => ({ slug: `lab-${r.toLowerCase()}`, name: `Lab for ${r}` }), expect: adminOnly(201) },
  { name: 'list users', method: 'GET', path: () => '/api/v1/admin/users', expect: adminOnly() },
  { name: 'change a role', method: 'PATCH', path: () => '/api/v1/admin/users/nobody', body: () => ({ role: 'curator' }), expect: { ...adminOnly(), admin: 404 } },
  { name: 'mail outbox', method: 'GET', path: () => '/api/v1/admin/outbox', expect: adminOnly() },
  { name: 'audit trail', method: 'GET', path: () => '/api/v1/admin/audit', expect: adminOnly() },
  { name: 'local registrar', method: 'GET', path: () => '/api/v1/admin/registrar', expect: adminOnly() },
  { name: 'fixity check', method: 'GET', path: () => '/api/v1/admin/fixity', expect: adminOnly() },
  { name: 'take a backup', method: 'POST', path: () => '/api/v1/admin/backups', expect: adminOnly() },
  { name: 'rehearse a registrar outage of 0 requests', method: 'POST', path: () => '/api/v1/admin/registrar/fail', body: () => ({ count: 0 }), expect: adminOnly() },
  { name: 'usage of a published dataset', method: 'GET', path: () => `/api/v1/datasets/${ids.publishedA}/usage`, expect: all(200) },
  { name: 'usage of a draft of lab A', method: 'GET', path: () => `/api/v1/datasets/${ids.draftA}/usage`,
    expect: { visitor: 404, contributorA: 200, contributorB: 404, curatorOfA: 200, curatorElsewhere: 404, admin: 200, tokenOfA: 200 } },
  { name: 'dataset usage report', method: 'GET', path: () => '/api/v1/reports/datasets?begin=2026-01&end=2026-12', expect: adminOnly() },
  { name: 'saved searches', method: 'GET', path: () => '/api/v1/account/saved-searches', expect: signedIn(200) },
  { name: 'save a search', method: 'POST', path: () => '/api/v1/account/saved-searches', body: r => ({ name: `matrix ${r}`, query: { q: 'porphyrin' } }), expect: signedIn(201) },
  { name: 'delete a saved search that is not yours', method: 'DELETE', path: () => '/api/v1/account/saved-searches/999999', expect: signedIn(404) },
  { name: 'unsubscribe with a forged token', method: 'POST', path: () => '/api/v1/account/saved-searches/unsubscribe', body: () => ({ token: '1.AAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAA' }), expect: all(422) },
  { name: 'run the digest job', method: 'POST', path: () => '/api/v1/admin/alerts', expect: adminOnly() },
  { name: 'decay fit', method: 'POST', path: () => '/api/v1/model/decay-fit', body: () => ({ model: 'mono', timeUnit: 'ns', times: Array.from({ length: 20 }, (_, i) => i), signal: Array.from({ length: 20 }, (_, i) => 100 * Math.exp(-i / 4)) }), expect: all(200) },
  { name: 'traces of a published dataset', method: 'GET', path: () => `/api/v1/datasets/${ids.publishedA}/traces`, expect: all(200) },
  { name: 'traces of a draft of lab A', method: 'GET', path: () => `/api/v1/datasets/${ids.draftA}/traces`,
    expect: { visitor: 404, contributorA: 200, contributorB: 404, curatorOfA: 200, curatorElsewhere: 404, admin: 200, tokenOfA: 200 } },
  { name: 'attach a trace to lab A\'s draft (JSON, not a file: 415 once past the guard)', method: 'POST', path: () => `/api/v1/datasets/${ids.draftA}/traces?timeUnit=ns&signal=emission`, body: () => ({}),
    expect: { visitor: 401, contributorA: 415, contributorB: 404, curatorOfA: 415, curatorElsewhere: 404, admin: 404, tokenOfA: 415 } },
  { name: 'a trace that does not exist', method: 'GET', path: () => '/api/v1/traces/999999', expect: all(404) },
  { name: 'rate from a trace that does not exist, in lab A\'s draft', method: 'POST', path: () => `/api/v1/datasets/${ids.draftA}/records/1/rate-from-trace`, body: () => ({ traceId: 999999, fit: { model: 'mono' } }),
    expect: { visitor: 401, contributorA: 404, contributorB: 404, curatorOfA: 404, curatorElsewhere: 404, admin: 404, tokenOfA: 404 } },
  { name: 'inspect a sheet for lab A\'s draft (JSON, not a file: 415 once past the guard)', method: 'POST', path: () => `/api/v1/datasets/${ids.draftA}/uploads/inspect`, body: () => ({}),
    expect: { visitor: 401, contributorA: 415, contributorB: 404, curatorOfA: 415, curatorElsewhere: 404, admin: 404, tokenOfA: 415 } },
  { name: 'column mappings of lab A', method: 'GET', path: () => `/api/v1/labs/${ids.labA}/mappings`,
    expect: { visitor: 401, contributorA: 200, contributorB: 404, curatorOfA: 200, curatorElsewhere: 404, admin: 404, tokenOfA: 200 } },
  { name: 'save a column mapping for lab A', method: 'POST', path: () => `/api/v1/labs/${ids.labA}/mappings`, body: r => ({ name: `matrix ${r}`, headers: ['Donor'], mapping: { headerRow: 1, firstDataRow: 2, decimal: '.', thousands: ',', columns: [{ field: 'donor_name' }] } }),
    expect: { visitor: 401, contributorA: 201, contributorB: 404, curatorOfA: 201, curatorElsewhere: 404, admin: 404, tokenOfA: 201 } },
  { name: 'spreadsheet header words', method: 'GET', path: () => '/api/v1/header-synonyms', expect: signedIn(200) },
  { name: 'add a spreadsheet header word', method: 'POST', path: () => '/api/v1/header-synonyms', body: r => ({ alias: `word for ${r}`, field: 'donor_name' }),
    expect: { visitor: 401, contributorA: 403, contributorB: 403, curatorOfA: 201, curatorElsewhere: 201, admin: 201, tokenOfA: 403 } },
  { name: 'similar systems of a published record', method: 'GET', path: () => `/api/v1/records/${ids.publishedRecord}/similar?limit=3`, expect: all(200) },
  { name: 'bundle of a published dataset', method: 'GET', path: () => `/api/v1/datasets/${ids.publishedA}/bundle`, expect: all(200) },
  { name: 'bundle of a draft of lab A', method: 'GET', path: () => `/api/v1/datasets/${ids.draftA}/bundle`,
    expect: { visitor: 404, contributorA: 200, contributorB: 404, curatorOfA: 200, curatorElsewhere: 404, admin: 200, tokenOfA: 200 } },
  { name: 'bundle of chosen published records', method: 'POST', path: () => '/api/v1/bundles', body: () => ({ recordIds: [ids.publishedRecord] }), expect: all(200) },
  { name: 'templates', method: 'GET', path: () => '/api/v1/templates/records.csv', expect: all(200) },
  { name: 'cite a published dataset', method: 'GET', path: () => `/api/v1/datasets/${ids.publishedA}/citation?format=bibtex`, expect: all(200) },
  { name: 'audit trail of a draft of lab A', method: 'GET', path: () => `/api/v1/datasets/${ids.draftA}/audit`,
    expect: { visitor: 401, contributorA: 200, contributorB: 404, curatorOfA: 200, curatorElsewhere: 404, admin: 200, tokenOfA: 200 } }, // a curator of another lab sees no trail of a dataset they cannot see
  { name: 'create a draft for lab A', method: 'POST', path: () => '/api/v1/datasets', body: () => ({ labId: ids.labA, title: 'Matrix draft' }),
    expect: { visitor: 401, contributorA: 201, contributorB: 403, curatorOfA: 201, curatorElsewhere: 403, admin: 403, tokenOfA: 201 } },
  { name: 'edit the metadata of lab A\'s draft', method: 'PATCH', path: () => `/api/v1/datasets/${ids.draftA}`, body: () => ({ keywords: ['matrix'] }),
    expect: { visitor: 401, contributorA: 200, contributorB: 404, curatorOfA: 200, curatorElsewhere: 404, admin: 404, tokenOfA: 200 } },
  { name: 'upload into lab A\'s draft (JSON, not a file: 415 once past the guard)', method: 'POST', path: () => `/api/v1/datasets/${ids.draftA}/uploads/check`, body: () => ({}),
    expect: { visitor: 401, contributorA: 415, contributorB: 404, curatorOfA: 415, curatorElsewhere: 404, admin: 404, tokenOfA: 415 } },
  { name: 'review queue', method: 'GET', path: () => '/api/v1/review/queue', expect: { ...all(403), visitor: 401, curatorOfA: 200, curatorElsewhere: 200, admin: 200 } },
  { name: 'review view of lab C\'s submission', method: 'GET', path: () => `/api/v1/review/${ids.submittedC}`, expect: { ...all(403), visitor: 401, curatorOfA: 200, curatorElsewhere: 200, admin: 200 } },
  { name: 'return lab C\'s submission with a stale view', method: 'POST', path: () => `/api/v1/review/${ids.submittedC}/return`, body: () => ({ comment: 'stale view', expectedUpdatedAt: 0 }),
    expect: { ...all(403), visitor: 401, curatorOfA: 409, curatorElsewhere: 409, admin: 409 } },
  { name: 'withdraw a draft', method: 'POST', path: () => `/api/v1/datasets/${ids.draftA}/withdraw`, body: () => ({ reason: 'testing the permission table' }), expect: { ...adminOnly(), admin: 409 } },
  { name: 'start a new version of lab A\'s published dataset', method: 'POST', path: () => `/api/v1/datasets/${ids.publishedA}/versions`,
    expect: { visitor: 401, contributorA: 201, contributorB: 404, curatorOfA: 409, curatorElsewhere: 404, admin: 404, tokenOfA: 409 } }
]

describe.each(CASES)('$method $name', (c) => {
  it.each(ROLES)('as %s', async (role) => {
    const r = await api(s.url, c.path(), { method: c.method, headers: auth[role], ...(c.body ? { json: c.body(role) } : {}) })
    expect(r.status, JSON.stringify(r.data).slice(0, 300)).toBe(c.expect[role])
  })
})
