/** Bundle of 100 000 published records streamed to a counting sink: seconds and resident-memory growth. */
import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { Writable } from 'node:stream'
import { eq } from 'drizzle-orm'
import { report } from './report'

const dir = mkdtempSync(join(tmpdir(), 'crosspoint-bench-'))
process.env.NUXT_DATABASE_URL = `file:${join(dir, 'bench.db')}`
const { openDatabase, schema } = await import('../server/utils/storage/db')
const { writeBundle } = await import('../server/utils/bundles/bundle')
const { DATASETS, demoRecords } = await import('../scripts/lib/scenario')
const { recordColumns } = await import('../shared/records/record-columns')

const { db, client } = await openDatabase(process.env.NUXT_DATABASE_URL)
const [lab] = await db.insert(schema.labs).values({ slug: 'bench', name: 'Bench lab (invented)' }).returning()
const [d] = await db.insert(schema.datasets).values({ labId: lab!.id, conceptDoi: '10.99999/bench' }).returning()
const meta = { title: 'Bench', creators: [{ name: 'Bench, Person' }], license: 'CC-BY-4.0' }
const [v] = await db.insert(schema.datasetVersions).values({ datasetId: d!.id, versionNumber: 1, state: 'published', title: 'Bench', metadata: meta as never, doi: '10.99999/bench.v1', publishedAt: new Date(), recordCount: 100_000 }).returning()
const pool = DATASETS.flatMap(ds => demoRecords(ds, 0))
await db.transaction(async (tx) => {
  for (let i = 0; i < 100_000; i += 1000) {
    await tx.insert(schema.rateRecords).values(Array.from({ length: 1000 }, (_, j) => { const data = pool[(i + j) % pool.length]!; return { versionId: v!.id, position: i + j + 1, recordKey: `b${i + j}`, data: data as never, ...recordColumns(data) } }))
  }
})
let bytes = 0
const sink = new Writable({ write (chunk, _e, cb) { bytes += chunk.length; cb() } })
global.gc?.()
const base = process.memoryUsage().rss
let peak = base
const timer = setInterval(() => { peak = Math.max(peak, process.memoryUsage().rss) }, 20)
const t = performance.now()
const res = await writeBundle({ where: eq(schema.rateRecords.versionId, v!.id), description: 'bench', source: 'http://localhost/bench' }, sink, new AbortController().signal)
const seconds = (performance.now() - t) / 1000
clearInterval(timer)
peak = Math.max(peak, process.memoryUsage().rss)
if (res.records !== 100_000) throw new Error(`bundled ${res.records} records`)
report('bundle.records100k.seconds', seconds, 's', 3)
report('bundle.records100k.rss_growth_mb', (peak - base) / 1048576, 'MB', 150)
process.stderr.write(`(zip of ${(bytes / 1048576).toFixed(1)} MB)\n`)
client.close()
rmSync(dir, { recursive: true, force: true })
