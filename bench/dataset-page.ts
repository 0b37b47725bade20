/**
 * The landing page of a published dataset of 10 000 records, rendered by the built server (SSR HTML and the
 * API answer it fetches): median and p95 milliseconds over 40 requests each, after 5 to warm up; and what counting
 * its use (COUNTER) adds to each.
 */
import { existsSync, mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { report } from './report'
import { startBuilt } from './built-server'

const N = 10_000
const entry = join(import.meta.dirname, '../.output/server/index.mjs')
if (!existsSync(entry)) {
  process.stderr.write('dataset page benchmark skipped: run `npx nuxt build` first\n')
  process.exit(0)
}
const dir = mkdtempSync(join(tmpdir(), 'crosspoint-bench-'))
process.env.NUXT_DATABASE_URL = `file:${join(dir, 'bench.db')}`
const { openDatabase, schema } = await import('../server/utils/storage/db')
const { DATASETS, demoRecords } = await import('../scripts/lib/scenario')
const { recordColumns } = await import('../shared/records/record-columns')

const { db, client } = await openDatabase(process.env.NUXT_DATABASE_URL)
const [lab] = await db.insert(schema.labs).values({ slug: 'bench', name: 'Bench lab (invented)' }).returning()
const [d] = await db.insert(schema.datasets).values({ labId: lab!.id, conceptDoi: '10.99999/bench' }).returning()
const meta = { title: 'Bench', creators: [{ name: 'Bench, Person' }], license: 'CC-BY-4.0' }
const [v] = await db.insert(schema.datasetVersions).values({
  datasetId: d!.id, versionNumber: 1, state: 'published', title: 'Synthetic bench dataset (invented)', metadata: meta as never,
  doi: '10.99999/bench.v1', publishedAt: new Date(), recordCount: N
}).returning()
const pool = DATASETS.flatMap(ds => demoRecords(ds, 0))
await db.transaction(async (tx) => {
  for (let i = 0; i < N; i += 1000) {
    await tx.insert(schema.rateRecords).values(Array.from({ length: 1000 }, (_, j) => {
      const data = pool[(i + j) % pool.length]!
      return { versionId: v!.id, position: i + j + 1, recordKey: `b${i + j}`, data: data as never, ...recordColumns(data) }
    }))
  }
})
client.close()

const { url, stop } = await startBuilt(entry, dir, 60)

async function time (path: string): Promise<{ median: number, p95: number, bytes: number }> {
  const ms: number[] = []
  let bytes = 0
  for (let i = 0; i < 45; i++) {
    const t = performance.now()
    const r = await fetch(url + path)
    const body = await r.text()
    if (!r.ok) throw new Error(`${path}: ${r.status}`)
    if (i >= 5) ms.push(performance.now() - t)
    bytes = body.length
  }
  ms.sort((a, b) => a - b)
  return { median: ms[Math.floor(ms.length / 2)]!, p95: ms[Math.floor(ms.length * 0.95)]!, bytes }
}
const page = await time(`/datasets/${d!.id}`)
const apiAnswer = await time(`/api/v1/datasets/${d!.id}?records=summary&page=1&pageSize=50`)

/**
 * What usage counting adds: the same request as a browser (counted: session hash, queued event, batched insert)
 * and as a robot (the user-agent check only), alternated so that both see the same server state; the added
 * cost is the difference of the medians over 300 pairs.
 */
const BROWSER = 'Mozilla/5.0 (X11; Linux x86_64; rv:128.0) Gecko/20100101 Firefox/128.0'
const ROBOT = 'Mozilla/5.0 (compatible; Googlebot/2.1; +http://www.google.com/bot.html)'
async function paired (path: string, pairs: number): Promise<{ counted: number, robot: number }> {
  const counted: number[] = []
  const robot: number[] = []
  for (let i = 0; i < pairs + 10; i++) {
    for (const [ua, into] of (i % 2 ? [[BROWSER, counted], [ROBOT, robot]] : [[ROBOT, robot], [BROWSER, counted]]) as [string, number[]][]) {
      const t = performance.now()
      const r = await fetch(url + path, { headers: { 'user-agent': ua } })
      await r.text()
      if (!r.ok) throw new Error(`${path}: ${r.status}`)
      if (i >= 10) into.push(performance.now() - t)
    }
  }
  const median = (xs: number[]) => xs.sort((a, b) => a - b)[Math.floor(xs.length / 2)]!
  return { counted: median(counted), robot: median(robot) }
}
const landing = await paired(`/datasets/${d!.id}`, 300)
const landingApi = await paired(`/api/v1/datasets/${d!.id}?records=summary&page=1&pageSize=50`, 300)
await fetch(`${url}/api/v1/datasets/${d!.id}/usage`) // flushes the queue
stop()
const after = await openDatabase(process.env.NUXT_DATABASE_URL)
const [{ n: written }] = (await after.client.execute('select count(*) as n from usage_event')).rows as unknown as [{ n: number }]
after.client.close()
report('usage.landing.added_ms', landing.counted - landing.robot, 'ms', 1)
report('usage.api.added_ms', landingApi.counted - landingApi.robot, 'ms', 1)
process.stderr.write(`(landing page median: counted ${landing.counted.toFixed(2)} ms, robot ${landing.robot.toFixed(2)} ms; `
  + `API: ${landingApi.counted.toFixed(2)} / ${landingApi.robot.toFixed(2)} ms; ${written} usage events written; one user-session, so they count as one investigation)\n`)
report('dataset.page10k.median_ms', page.median, 'ms', 30)
report('dataset.page10k.p95_ms', page.p95, 'ms', 60)
report('dataset.api10k.median_ms', apiAnswer.median, 'ms', 10)
process.stderr.write(`(page ${(page.bytes / 1024).toFixed(0)} kB of HTML)\n`)
rmSync(dir, { recursive: true, force: true })
