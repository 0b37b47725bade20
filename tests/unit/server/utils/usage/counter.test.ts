/**
 * A log of events replayed through the counting rules, with the counts worked out by hand per rule of the
 * COUNTER Code of Practice for Research Data (release 1; rules quoted from memory of the Code and of COUNTER
 * release 5, which it follows):
 * - R1 double-click: clicks of one user-session on one item within 30 s count once — each click compared with
 *   the next one, so a run 0 s, 20 s, 45 s is one click;
 * - R2 unique: one per user-session that did the action in the period;
 * - R3 a request is also an investigation;
 * - R4 robots are not counted (by user agent);
 * - R5 machine access (scripts with an API token) is reported apart from regular access;
 * - R6 the fallback user-session of a visitor without a session is address + user agent + hour.
 * A real SQLite file through libSQL, migrated like the server's.
 */
import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { openDatabase, schema, type Db } from '../../../../../server/utils/storage/db'
import { usageEvent, writeEvents, isRobot, type Requester, type UsageEvent } from '../../../../../server/utils/usage/events'
import { datasetUsage, usageRows } from '../../../../../server/utils/usage/report'
import { datasetReport } from '../../../../../server/utils/usage/dsr'

const dir = mkdtempSync(join(tmpdir(), 'crosspoint-usage-'))
let db: Db
let close: () => void
let datasetId = 0
afterAll(() => { close?.(); rmSync(dir, { recursive: true, force: true }) })

const FIREFOX = 'Mozilla/5.0 (X11; Linux x86_64; rv:128.0) Gecko/20100101 Firefox/128.0'
const A: Requester = { userAgent: FIREFOX, sessionId: 'session-of-a' }
const B: Requester = { userAgent: FIREFOX, address: '203.0.113.5' }
const ROBOT: Requester = { userAgent: 'Mozilla/5.0 (compatible; Googlebot/2.1; +http://www.google.com/bot.html)', address: '198.51.100.7' }
const SCRIPT: Requester = { userAgent: 'python-requests/2.31', tokenId: 7 }
const T0 = Date.parse('2026-11-10T10:00:00Z')

beforeAll(async () => {
  const opened = await openDatabase(`file:${join(dir, 'usage.db')}`)
  db = opened.db
  close = () => opened.client.close()
  const [lab] = await db.insert(schema.labs).values({ slug: 'usage-lab', name: 'Usage Lab (fictional)' }).returning()
  const [d] = await db.insert(schema.datasets).values({ labId: lab!.id, conceptDoi: '10.99999/usage.1' }).returning()
  datasetId = d!.id
  await db.insert(schema.datasetVersions).values({
    datasetId, versionNumber: 1, state: 'published', title: 'Usage under test', doi: '10.99999/usage.1.v1',
    metadata: { creators: [{ name: 'Quell, Ada', nameType: 'Personal', familyName: 'Quell', givenName: 'Ada' }] },
    publishedAt: new Date('2026-06-01T00:00:00Z')
  })
  const log: [Requester, 'investigation' | 'request', string, number][] = [
    // A (signed in): landing at 0, 20, 45 s is one run (R1), 100 s a second click
    [A, 'investigation', 'landing', 0], [A, 'investigation', 'landing', 20], [A, 'investigation', 'landing', 45],
    [A, 'investigation', 'landing', 100],
    [A, 'investigation', 'record:5', 105], // another item: counts
    [A, 'request', 'bundle', 110], [A, 'request', 'bundle', 130], // a double download: one request (R1), also an investigation (R3)
    // B (visitor): 0 and 31 s are two clicks (31 > 30), a citation, and an hour later a new user-session (R6)
    [B, 'investigation', 'landing', 0], [B, 'investigation', 'landing', 31], [B, 'investigation', 'citation:bibtex', 40],
    [B, 'investigation', 'landing', 3600],
    // a robot, three times: nothing (R4)
    [ROBOT, 'investigation', 'landing', 1], [ROBOT, 'investigation', 'landing', 50], [ROBOT, 'request', 'bundle', 60],
    // a script with a token: machine access (R5)
    [SCRIPT, 'investigation', 'landing', 2], [SCRIPT, 'request', 'bundle', 5],
    // A again in December: another day, another month
    [A, 'investigation', 'landing', Date.parse('2026-12-02T09:00:00Z') / 1000 - T0 / 1000]
  ]
  const events: UsageEvent[] = []
  for (const [who, kind, item, s] of log) {
    const e = await usageEvent(db, who, { datasetId, kind, item, at: new Date(T0 + s * 1000) })
    if (e) events.push(e)
  }
  expect(events).toHaveLength(log.length - 3) // the robot's three are never written
  await writeEvents(db, events)
})

describe('COUNTER counts of a replayed log', () => {
  it('November, regular access: 8 investigations by 3 user-sessions, 1 request by 1', async () => {
    // investigations: A landing 2 (R1) + record 1 + bundle 1 (R3) = 4; B landing 0, 31, 3600 + citation = 4
    // unique: A 1, B 2 (two hours, R6) = 3; requests: A's bundle once (R1), by 1 session
    const nov = (await usageRows(db, '2026-11', '2026-11', datasetId)).filter(r => !r.machine)
    expect(nov).toHaveLength(1)
    expect(nov[0]!.counts).toEqual({ investigations: { total: 8, unique: 3 }, requests: { total: 1, unique: 1 } })
  })
  it('machine access is apart: 2 investigations (landing + bundle, R3) and 1 request by one token', async () => {
    const m = (await usageRows(db, '2026-11', '2026-11', datasetId)).filter(r => r.machine)
    expect(m.map(r => r.counts)).toEqual([{ investigations: { total: 2, unique: 1 }, requests: { total: 1, unique: 1 } }])
  })
  it('the dataset\'s usage over November–December adds the months and both access methods', async () => {
    const u = await datasetUsage(db, datasetId, '2026-10', '2026-12')
    expect(u.months.map(m => m.month)).toEqual(['2026-10', '2026-11', '2026-12'])
    expect(u.months[0]).toEqual({ month: '2026-10', investigations: { total: 0, unique: 0 }, requests: { total: 0, unique: 0 } })
    expect(u.months[1]).toEqual({ month: '2026-11', investigations: { total: 10, unique: 4 }, requests: { total: 2, unique: 2 } })
    expect(u.months[2]).toEqual({ month: '2026-12', investigations: { total: 1, unique: 1 }, requests: { total: 0, unique: 0 } })
    expect(u.investigations).toEqual({ total: 11, unique: 5 })
    expect(u.requests).toEqual({ total: 2, unique: 2 })
    expect(u.machine).toEqual({ investigations: { total: 2, unique: 1 }, requests: { total: 1, unique: 1 } })
  })
  it('nothing personal is stored: session hashes only, no address or user agent, one salt kept', async () => {
    const rows = await db.select().from(schema.usageEvents)
    for (const r of rows) {
      expect(r.session).toMatch(/^[\w-]{22}$/)
      expect(JSON.stringify(r)).not.toMatch(/203\.0\.113|Firefox|session-of-a/)
    }
    // the salt of 10 November was deleted when 2 December's was made
    expect((await db.select().from(schema.usageSalts)).map(s => s.day)).toEqual(['2026-12-02'])
  })
  it('robots by the isbot list; an empty user agent counts as a script', () => {
    expect(isRobot(ROBOT.userAgent)).toBe(true)
    expect(isRobot('')).toBe(true)
    expect(isRobot(FIREFOX)).toBe(false)
  })
  it('the Dataset Report (DSR) lists per month and access method the four metrics', async () => {
    const r = await datasetReport(db, '2026-11', '2026-12', 'https://crosspoint.example', new Date('2026-12-03T00:00:00Z'))
    expect(r['report-header']).toMatchObject({ 'report-id': 'DSR', 'release': 'rd1', 'reporting-period': { 'begin-date': '2026-11-01', 'end-date': '2026-12-31' } })
    const d = r['report-datasets'][0]!
    expect(d['dataset-id']).toEqual([{ type: 'doi', value: '10.99999/usage.1' }])
    expect(d['dataset-contributors']).toEqual([{ type: 'name', value: 'Quell, Ada' }])
    expect(d.yop).toBe('2026')
    const nov = d.performance.find(p => p.period['begin-date'] === '2026-11-01')!
    expect(nov.period['end-date']).toBe('2026-11-30')
    const count = (method: string, metric: string) => nov.instance.find(i => i['access-method'] === method && i['metric-type'] === metric)?.count
    expect(count('regular', 'total-dataset-investigations')).toBe(8)
    expect(count('regular', 'unique-dataset-investigations')).toBe(3)
    expect(count('regular', 'total-dataset-requests')).toBe(1)
    expect(count('machine', 'total-dataset-investigations')).toBe(2)
    expect(count('machine', 'unique-dataset-requests')).toBe(1)
    expect(d.performance.map(p => p.period['begin-date'])).toEqual(['2026-11-01', '2026-12-01'])
  })
})
