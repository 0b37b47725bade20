/**
 * Shared systems at 100 000 published records (100 datasets in 20 labs drawing from the demo's records, so many
 * systems are measured by several labs): the first answer (grouping and consensus computed) and the warm answers of
 * the list, a search, one system and a record page's API (which names its system), median and p95 over 40 requests.
 */
import { existsSync, mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { report } from './report'
import { startBuilt } from './built-server'

const N = 100_000
const DATASETS_N = 100
const entry = join(import.meta.dirname, '../.output/server/index.mjs')
if (!existsSync(entry)) {
  process.stderr.write('systems benchmark skipped: run `npx nuxt build` first\n')
  process.exit(0)
}
const dir = mkdtempSync(join(tmpdir(), 'crosspoint-bench-'))
process.env.NUXT_DATABASE_URL = `file:${join(dir, 'bench.db')}`
const { openDatabase, schema } = await import('../server/utils/storage/db')
const { DATASETS, demoRecords } = await import('../scripts/lib/scenario')
const { recordColumns } = await import('../shared/records/record-columns')

const { db, client } = await openDatabase(process.env.NUXT_DATABASE_URL)
const labs = await db.insert(schema.labs).values(Array.from({ length: 20 }, (_, i) => ({ slug: `bench-${i}`, name: `Bench lab ${i} (invented)` }))).returning()
const pool = DATASETS.flatMap(ds => demoRecords(ds, 0))
const meta = { title: 'Bench', creators: [{ name: 'Bench, Person' }], license: 'CC-BY-4.0' }
const per = N / DATASETS_N
for (let k = 0; k < DATASETS_N; k++) {
  const [d] = await db.insert(schema.datasets).values({ labId: labs[k % labs.length]!.id, conceptDoi: `10.99999/bench.${k}` }).returning()
  const [v] = await db.insert(schema.datasetVersions).values({
    datasetId: d!.id, versionNumber: 1, state: 'published', title: `Synthetic bench dataset ${k} (invented)`, metadata: meta as never,
    doi: `10.99999/bench.${k}.v1`, publishedAt: new Date(), recordCount: per
  }).returning()
  await db.transaction(async (tx) => {
    for (let i = 0; i < per; i += 1000) {
      await tx.insert(schema.rateRecords).values(Array.from({ length: Math.min(1000, per - i) }, (_, j) => {
        const data = pool[(k * 37 + i + j) % pool.length]!
        return { versionId: v!.id, position: i + j + 1, recordKey: `b${k}-${i + j}`, data: data as never, ...recordColumns(data) }
      }))
    }
  })
}
client.close()

const { url, stop } = await startBuilt(entry, dir, 120)

async function time (path: string, n = 40): Promise<{ median: number, p95: number }> {
  const ms: number[] = []
  for (let i = 0; i < n + 3; i++) {
    const t = performance.now()
    const r = await fetch(url + path)
    await r.text()
    if (!r.ok) throw new Error(`${path}: ${r.status}`)
    if (i >= 3) ms.push(performance.now() - t)
  }
  ms.sort((a, b) => a - b)
  return { median: ms[Math.floor(ms.length / 2)]!, p95: ms[Math.floor(ms.length * 0.95)]! }
}
const t0 = performance.now()
const first = await (await fetch(`${url}/api/v1/systems?pageSize=1`)).json() as { total: number, items: { key: string }[] }
const cold = performance.now() - t0
const list = await time('/api/v1/systems')
const search = await time('/api/v1/systems?q=porphyrin+toluene')
const one = await time(`/api/v1/systems/${first.items[0]!.key}`)
const record = await time('/api/v1/records/50000')
stop()
report('systems.first100k.ms', cold, 'ms', 2000)
report('systems.list100k.p95_ms', list.p95, 'ms', 50)
report('systems.search100k.p95_ms', search.p95, 'ms', 50)
report('systems.detail100k.p95_ms', one.p95, 'ms', 50)
report('systems.record100k.p95_ms', record.p95, 'ms', 50)
process.stderr.write(`(${first.total} systems of several labs)\n`)
rmSync(dir, { recursive: true, force: true })
