/**
 * Search at 100 000 synthetic records: in-process index build and query p95 (20 fixed queries with
 * typos and filters), then the built server under autocannon (50 connections) with its RSS.
 */
import { spawn } from 'node:child_process'
import { existsSync, mkdtempSync, rmSync } from 'node:fs'
import { createServer } from 'node:net'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import autocannon from 'autocannon'
import { report } from './report'

const word = process.argv[2] ?? ''
const want = (n: string) => !word || n.includes(word)
const dir = mkdtempSync(join(tmpdir(), 'crosspoint-bench-search-'))
process.env.NUXT_DATABASE_URL = `file:${join(dir, 'bench.db')}`
const { openDatabase, schema } = await import('../server/utils/storage/db')
const { toDoc } = await import('../server/utils/search/search')
const { RecordIndex } = await import('../server/utils/search/record-index')
const { DATASETS, demoRecords } = await import('../scripts/lib/scenario')
const { recordColumns } = await import('../shared/records/record-columns')

const pool = DATASETS.flatMap(ds => demoRecords(ds, 0))
const N = 100_000
const QUERIES: Record<string, string | number>[] = [
  { q: 'porphirin' }, { q: 'znp c60' }, { q: 'benzonitril', deltaGMin: -1 }, { q: 'viologen' }, { q: 'ruthenum' },
  { q: 'dimethoxy' }, { q: 'fullerne', solvent: 'toluene' }, { q: 'acridinium' }, { q: 'imide', deltaGMax: -1.5 }, { q: 'copper protien' },
  { process: 'charge-separation', temperatureMin: 250 }, { solvent: 'water' }, { linkage: 'bimolecular' }, { q: 'triethylamine' }, { q: 'iridum', solvent: 'acetonitrile' },
  { q: 'terphenylene' }, { deltaGMin: -0.8, deltaGMax: -0.2, distanceMin: 10 }, { q: 'heme' }, { q: 'NDI', technique: 'transient-absorption' }, { q: 'chlorin' }
]

if (want('search.build100k.seconds') || want('search.query.p95_ms')) {
  // Synthetic records drawn from the demo families, made more varied than the demo: 500 datasets
  // in 20 labs, and notes that differ on every record (so the text index holds ~100 000 values).
  const docs = Array.from({ length: N }, (_, i) => {
    const data = { ...pool[i % pool.length]!, notes: `synthetic bench record ${i}; sample S${(i * 7919) % 100_003}` }
    const c = recordColumns(data)
    return toDoc({ id: i + 1, data, datasetId: 1 + (i % 500), labId: 1 + (i % 20), visibility: i % 10 === 9 ? 'draft' : 'public', title: `Synthetic dataset ${i % 500} (bench)`, lab: `Lab ${i % 20}`, keywords: ['bench'], year: 2020 + (i % 7), deltaG: c.deltaG, temperatureK: c.temperatureK, distance: c.distanceAngstrom, log10Rate: c.log10Rate })
  })
  const t = performance.now()
  const index = new RecordIndex()
  index.add(docs)
  report('search.build100k.seconds', (performance.now() - t) / 1000, 's', 5)
  const times: number[] = []
  for (let round = 0; round < 5; round++) {
    for (const q of QUERIES) {
      const s = performance.now()
      const res = index.search({ ...q, page: 1, pageSize: 50 } as never, null)
      if (round > 0) times.push(performance.now() - s)
      if (round === 4 && process.env.BENCH_DETAIL) process.stderr.write(`${JSON.stringify(q)} ${(performance.now() - s).toFixed(1)} ms, ${res.total} hits\n`)
    }
  }
  times.sort((a, b) => a - b)
  report('search.query.p95_ms', times[Math.floor(times.length * 0.95)]!, 'ms', 10)
  const sim: number[] = []
  for (let i = 0; i < 20; i++) { const s = performance.now(); index.similar(1 + i * 4999, null, 10); sim.push(performance.now() - s) }
  sim.sort((a, b) => a - b)
  report('search.similar.median_ms', sim[10]!, 'ms', 100)
}

if (want('search.http.requests_per_second') || want('search.server.rss_mb')) {
  const entry = join(import.meta.dirname, '../.output/server/index.mjs')
  if (!existsSync(entry)) {
    process.stderr.write('search HTTP benchmark skipped: run `npm run build` first\n')
  }
  else {
    const { db, client } = await openDatabase(process.env.NUXT_DATABASE_URL!)
    const [lab] = await db.insert(schema.labs).values({ slug: 'bench', name: 'Bench lab (invented)' }).returning()
    const [d] = await db.insert(schema.datasets).values({ labId: lab!.id }).returning()
    const [v] = await db.insert(schema.datasetVersions).values({ datasetId: d!.id, versionNumber: 1, state: 'published', title: 'Synthetic bench dataset', metadata: { keywords: ['bench'] } as never, publishedAt: new Date(), doi: '10.99999/bench.v1' }).returning()
    await db.transaction(async (tx) => {
      for (let i = 0; i < N; i += 1000) await tx.insert(schema.rateRecords).values(Array.from({ length: 1000 }, (_, j) => { const data = pool[(i + j) % pool.length]!; return { versionId: v!.id, position: i + j + 1, recordKey: `b${i + j}`, data: data as never, ...recordColumns(data) } }))
    })
    client.close()
    const port = await new Promise<number>((r) => { const s = createServer(); s.listen(0, '127.0.0.1', () => { const p = (s.address() as { port: number }).port; s.close(() => r(p)) }) })
    const url = `http://127.0.0.1:${port}`
    const proc = spawn(process.execPath, [entry], { env: { ...process.env, PORT: String(port), HOST: '127.0.0.1', AUTH_ORIGIN: `${url}/api/auth`, NUXT_DATA_DIR: dir, NUXT_AUTH_SECRET: 'bench-secret-not-for-production' }, stdio: 'ignore' })
    for (let i = 0; i < 600; i++) {
      try { const r = await fetch(`${url}/api/v1/records?q=porphyrin&pageSize=1`); if (r.ok && (await r.json() as { total: number }).total > 0) break }
      catch { /* starting */ }
      await new Promise(r => setTimeout(r, 100))
    }
    let i = 0
    const res = await autocannon({
      url, connections: 50, duration: 20,
      requests: [{ method: 'GET', setupRequest: (req: Record<string, unknown>) => { const q = QUERIES[i++ % QUERIES.length]!; return { ...req, path: `/api/v1/records?${new URLSearchParams(Object.entries(q).map(([k, v]) => [k, String(v)]))}&pageSize=20` } } }]
    })
    // distinct queries: every request a new ΔG° window and page, so the answer cache never hits
    let j = 0
    const distinct = await autocannon({
      url, connections: 50, duration: 20,
      requests: [{ method: 'GET', setupRequest: (req: Record<string, unknown>) => { j++; const q = QUERIES[j % QUERIES.length]!; return { ...req, path: `/api/v1/records?${new URLSearchParams(Object.entries(q).map(([k, v]) => [k, String(v)]))}&deltaGMin=${(-3 + (j % 997) / 1000).toFixed(3)}&page=${1 + (j % 7)}&pageSize=20` } } }]
    })
    report('search.http.distinct_rps', distinct.requests.average, '1/s', 300)
    process.stderr.write(`(distinct queries: ${distinct.errors} errors, ${distinct.non2xx} non-2xx, p95 ${distinct.latency.p97_5 ?? distinct.latency.p99} ms)\n`)
    const rss = Number((await import('node:fs')).readFileSync(`/proc/${proc.pid}/status`, 'utf8').match(/VmHWM:\s+(\d+)/)![1]) / 1024
    proc.kill('SIGTERM')
    report('search.http.requests_per_second', res.requests.average, '1/s', 1500)
    process.stderr.write(`(search HTTP: ${res.errors} errors, ${res.non2xx} non-2xx, p99 ${res.latency.p99} ms)\n`)
    report('search.server.rss_mb', rss, 'MB', 1024)
  }
}
rmSync(dir, { recursive: true, force: true })
