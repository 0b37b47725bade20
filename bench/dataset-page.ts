/**
 * The landing page of a published dataset of 10 000 records, rendered by the built server (SSR HTML and the
 * API answer it fetches): median and p95 milliseconds over 40 requests each, after 5 to warm up.
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
stop()
report('dataset.page10k.median_ms', page.median, 'ms', 30)
report('dataset.page10k.p95_ms', page.p95, 'ms', 60)
report('dataset.api10k.median_ms', apiAnswer.median, 'ms', 10)
process.stderr.write(`(page ${(page.bytes / 1024).toFixed(0)} kB of HTML)\n`)
rmSync(dir, { recursive: true, force: true })
