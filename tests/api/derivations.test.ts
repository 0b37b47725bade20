/**
 * ΔG° from redox potentials by process, through every deposit path, the migration of drafts and the
 * curators' report. Worked values by mpmath (tests/fixtures/physics/worked-checks-mpmath.json; E_ox 0.85 V, E_red −0.55 V vs SCE, E₀₀ 2.10 eV,
 * R 10 Å, acetonitrile ε 35.94): charge separation −0.74007 eV, charge recombination −1.35993 eV,
 * charge shift −0.70 eV (no ion-pair term).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { createClient, type Client } from '@libsql/client'
import { api, DEMO, signIn, startServer, type TestServer } from '../helpers/server'
import { ingestRow } from '../../shared/records/ingest'
// @ts-expect-error generated standalone code without types
import validateRecordSchema from '../../shared/records/generated/rate-record.validate.mjs'
import type { RateRecordV1 } from '../../shared/records/types'

let s: TestServer
let db: Client
let a: string; let otherCurator: string; let admin: string
let draftId: number
/** A draft CR record and a published CS record whose stored ΔG° is set wrong before the server starts. */
const tampered = { draftRecord: 0, draftWrong: 0, draftRight: 0, publishedDataset: 0, publishedRecord: 0 }

const WORKED = { 'charge-separation': -0.74007, 'charge-recombination': -1.35993, 'charge-shift': -0.70 } as const
const cells = (process: string) => ({
  donor_name: 'D', acceptor_name: 'A', linkage: 'covalent', process, initial_state: process === 'charge-recombination' ? 'thermal' : 'singlet',
  solvent: 'acetonitrile', temperature: '298.15', distance_cc: '10', rate: '1e9', technique: 'transient-absorption',
  donor_oxidation_potential: '0.85', donor_reference: 'SCE', acceptor_reduction_potential: '-0.55', acceptor_reference: 'SCE', excitation_energy: '2.10'
})

beforeAll(async () => {
  s = await startServer({
    seed: true,
    // Before the server (and its data migration) starts: one draft charge-recombination record gets the
    // value the old rule gave (Rehm–Weller with E₀₀), one published record a value 0.2 eV off.
    beforeStart: async (url) => {
      const c = createClient({ url })
      const row = (await c.execute(`select r.id, r.data from rate_record r join dataset_version v on v.id = r.version_id
        where v.state = 'draft' and r.process = 'charge-recombination' and json_extract(r.data, '$.drivingForce.method') = 'redox-potentials' limit 1`)).rows[0]!
      const rec = JSON.parse(String(row.data)) as RateRecordV1
      tampered.draftRecord = Number(row.id); tampered.draftRight = rec.drivingForce!.value
      const x = rec.drivingForce!.redox!
      const coulomb = -14.3996454784 / (rec.medium.permittivity! * rec.geometry!.centerToCenterAngstrom!) // e²/(4πε₀) in eV Å, CODATA 2018 (from memory to 10 digits)
      tampered.draftWrong = Math.round((x.donorOxidationPotential - x.acceptorReductionPotential + coulomb) * 1e4) / 1e4 // the old rule: charge-separation formula without E₀₀
      rec.drivingForce!.value = tampered.draftWrong
      await c.execute({ sql: 'update rate_record set data = ?, delta_g = ? where id = ?', args: [JSON.stringify(rec), tampered.draftWrong, tampered.draftRecord] })
      const pub = (await c.execute(`select r.id, r.data, v.dataset_id from rate_record r join dataset_version v on v.id = r.version_id
        where v.state = 'published' and json_extract(r.data, '$.drivingForce.method') = 'redox-potentials'
          and v.version_number = (select max(version_number) from dataset_version w where w.dataset_id = v.dataset_id and w.state = 'published')
        order by v.dataset_id limit 1`)).rows[0]!
      const p = JSON.parse(String(pub.data)) as RateRecordV1
      p.drivingForce!.value = Math.round((p.drivingForce!.value + 0.2) * 1e4) / 1e4
      tampered.publishedRecord = Number(pub.id); tampered.publishedDataset = Number(pub.dataset_id)
      await c.execute({ sql: 'update rate_record set data = ? where id = ?', args: [JSON.stringify(p), tampered.publishedRecord] })
      c.close()
    }
  })
  db = createClient({ url: s.dbUrl })
  a = await signIn(s.url, DEMO.contributorA)
  admin = await signIn(s.url, DEMO.admin)
  // a curator of no lab, to start corrections of any lab's data
  await api(s.url, '/api/v1/account/signup', { method: 'POST', json: { name: 'Other Curator', email: 'other.curator@example.org', password: 'a-long-enough-password' } })
  const { lastMailTo } = await import('../helpers/server')
  await api(s.url, '/api/v1/account/verify', { method: 'POST', json: { token: (await lastMailTo(s.url, admin, 'other.curator@example.org')).token } })
  const users = (await api(s.url, '/api/v1/admin/users', { headers: { cookie: admin } })).data.items
  await api(s.url, `/api/v1/admin/users/${users.find((u: { email: string }) => u.email === 'other.curator@example.org').id}`, { method: 'PATCH', headers: { cookie: admin }, json: { role: 'curator' } })
  otherCurator = await signIn(s.url, 'other.curator@example.org', 'a-long-enough-password')
  const me = (await api(s.url, '/api/v1/me', { headers: { cookie: a } })).data.user
  draftId = (await api(s.url, '/api/v1/datasets', { method: 'POST', headers: { cookie: a }, json: { labId: me.labIds[0], title: 'Derivations under test' } })).data.id
}, 120_000)
afterAll(async () => { db?.close(); await s?.stop() })

const deltaGs = async () => (await api(s.url, `/api/v1/datasets/${draftId}/versions/1`, { headers: { cookie: a } })).data.records.map((r: { data: RateRecordV1 }) => [r.data.process, r.data.drivingForce!.value])

describe('ΔG° from potentials by process, on every deposit path', () => {
  it('upload: a CSV with a charge-separation, a charge-recombination and a charge-shift row derives the worked values', async () => {
    const keys = Object.keys(cells('x'))
    const header = keys.map(k => ({ temperature: 'temperature (K)', distance_cc: 'distance_cc (angstrom)', rate: 'rate (s-1)', donor_oxidation_potential: 'donor_oxidation_potential (V)', acceptor_reduction_potential: 'acceptor_reduction_potential (V)', excitation_energy: 'excitation_energy (eV)' } as Record<string, string>)[k] ?? k)
    const csv = [header.join(','), ...Object.keys(WORKED).map(p => Object.values(cells(p)).join(','))].join('\r\n')
    const form = new FormData()
    form.append('file', new Blob([csv]), 'potentials.csv')
    const chk = await (await fetch(`${s.url}/api/v1/datasets/${draftId}/uploads/check`, { method: 'POST', body: form, headers: { cookie: a } })).json() as any
    expect(chk.issueCount, JSON.stringify(chk.issues)).toBe(0)
    expect(chk.derivedCount).toBe(3)
    const c = await api(s.url, `/api/v1/datasets/${draftId}/uploads/${chk.upload.id}/commit`, { method: 'POST', headers: { cookie: a }, json: { mode: 'append' } })
    expect(c.status).toBe(200)
    const got = await deltaGs()
    for (const [process, value] of Object.entries(WORKED)) expect(got.find((g: [string, number]) => g[0] === process)[1]).toBeCloseTo(value, 5)
  })
  it('form: the entry form\'s check (ingestRow with the generated validator) derives them, and the API stores what it made', async () => {
    const ctx = { solvents: new Map([['acetonitrile', { name: 'acetonitrile', permittivity: 35.94, refractiveIndex: 1.3442, viscosity: 0.341 }]]) }
    const made = Object.entries(WORKED).map(([process, value]) => {
      const r = ingestRow(cells(process), { temperature: 'K', distance_cc: 'angstrom', rate: 's-1', donor_oxidation_potential: 'V', acceptor_reduction_potential: 'V', excitation_energy: 'eV' }, validateRecordSchema as never, ctx)
      expect(r.issues).toEqual([])
      expect(r.record!.drivingForce!.value).toBeCloseTo(value, 5)
      return r.record!
    })
    const post = await api(s.url, `/api/v1/datasets/${draftId}/records`, { method: 'POST', headers: { cookie: a }, json: { records: made } })
    expect(post.status).toBe(201)
  })
  it('API: a charge-recombination record carrying the charge-separation value is refused with the right value named', async () => {
    const ctx = { solvents: new Map([['acetonitrile', { name: 'acetonitrile', permittivity: 35.94, refractiveIndex: 1.3442, viscosity: 0.341 }]]) }
    const cr = ingestRow(cells('charge-recombination'), { temperature: 'K', distance_cc: 'angstrom', rate: 's-1', donor_oxidation_potential: 'V', acceptor_reduction_potential: 'V', excitation_energy: 'eV' }, validateRecordSchema as never, ctx).record!
    const before = (await db.execute('select count(*) n from rate_record')).rows[0]!.n
    for (const wrong of [1.36, -0.74]) {
      const r = await api(s.url, `/api/v1/datasets/${draftId}/records`, { method: 'POST', headers: { cookie: a }, json: { records: [{ ...cr, drivingForce: { ...cr.drivingForce!, value: wrong } }] } })
      expect(r.status).toBe(422)
      expect(r.data.data.issues).toEqual([expect.objectContaining({ path: '/records/0/drivingForce/value', message: 'does not match the potentials: charge recombination, −(ΔG°_CS + E₀₀) gives -1.360 eV' })])
    }
    const other = await api(s.url, `/api/v1/datasets/${draftId}/records`, { method: 'POST', headers: { cookie: a }, json: { records: [{ ...cr, process: 'other' }] } })
    expect(other.status).toBe(422)
    expect(other.data.data.issues[0].path).toBe('/records/0/process')
    expect((await db.execute('select count(*) n from rate_record')).rows[0]!.n).toBe(before)
  })
})

describe('drafts re-derived once at start; published versions reported, never changed', () => {
  it('the data migration corrected the draft record and wrote an audit event', async () => {
    const row = (await db.execute({ sql: 'select data, delta_g, csv_line from rate_record where id = ?', args: [tampered.draftRecord] })).rows[0]!
    const rec = JSON.parse(String(row.data)) as RateRecordV1
    expect(tampered.draftWrong).not.toBeCloseTo(tampered.draftRight, 2)
    expect(rec.drivingForce!.value).toBeCloseTo(tampered.draftRight, 3)
    expect(Number(row.delta_g)).toBeCloseTo(tampered.draftRight, 3)
    const audit = (await db.execute(`select detail from audit_event where action = 'dataset.rederived'`)).rows
    expect(audit.length).toBe(1)
    expect(JSON.parse(String(audit[0]!.detail)).records).toBe(1)
    const mig = (await db.execute(`select name from data_migration`)).rows.map(r => r.name)
    expect(mig).toEqual(['2026-12-driving-force-by-process'])
  })
  it('curators see the published dataset whose stored ΔG° differs; contributors may not', async () => {
    expect((await api(s.url, '/api/v1/review/derivations', { headers: { cookie: a } })).status).toBe(403)
    const r = await api(s.url, '/api/v1/review/derivations', { headers: { cookie: otherCurator } })
    expect(r.status).toBe(200)
    expect(r.data.items).toHaveLength(1)
    expect(r.data.items[0]).toMatchObject({ datasetId: tampered.publishedDataset, differing: 1 })
    expect(r.data.items[0].examples[0].recordId).toBe(tampered.publishedRecord)
  })
  it('a curator starts a correction version: a new draft with the value re-derived, the published one untouched, the lab mailed', async () => {
    const publishedBefore = (await db.execute({ sql: 'select data from rate_record where id = ?', args: [tampered.publishedRecord] })).rows[0]!.data
    const r = await api(s.url, `/api/v1/review/derivations/${tampered.publishedDataset}`, { method: 'POST', headers: { cookie: otherCurator } })
    expect(r.status, JSON.stringify(r.data)).toBe(201)
    expect(r.data.rederived).toBe(1)
    expect((await db.execute({ sql: 'select data from rate_record where id = ?', args: [tampered.publishedRecord] })).rows[0]!.data).toBe(publishedBefore)
    const draft = (await db.execute({ sql: `select r.data from rate_record r join dataset_version v on v.id = r.version_id
      where v.dataset_id = ? and v.version_number = ? and r.record_key = (select record_key from rate_record where id = ?)`, args: [tampered.publishedDataset, r.data.versionNumber, tampered.publishedRecord] })).rows[0]!
    const old = JSON.parse(String(publishedBefore)) as RateRecordV1
    expect(JSON.parse(String(draft.data)).drivingForce.value).toBeCloseTo(old.drivingForce!.value - 0.2, 3)
    const again = await api(s.url, `/api/v1/review/derivations/${tampered.publishedDataset}`, { method: 'POST', headers: { cookie: otherCurator } })
    expect(again.status).toBe(409)
    const mail = await api(s.url, '/api/v1/admin/outbox', { headers: { cookie: admin } })
    expect(JSON.stringify(mail.data)).toMatch(/Correction started: dataset/)
  })
})
