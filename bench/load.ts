/**
 * Mixed load against the built server: 60 s at 50 connections of search, record pages, model
 * curves, bundle downloads and sign-in attempts, on the seeded demo database. Reports throughput,
 * p50/p99 latency, 5xx answers (must be 0; 429s from the limits are expected) and memory.
 *
 * Memory: a 20 s warm-up of the same mix comes first (JIT, caches, pools filling), then the 60 s
 * that are measured. RSS alone cannot tell a leak from V8 growing its heap because it may (it
 * grows the old space lazily under a high allocation rate, up to its limit), so the server also
 * runs with --trace-gc and the bench reads the live heap left after each full (mark-compact)
 * collection: a leak shows as that floor rising; a stable server keeps it flat.
 */
import { spawn } from 'node:child_process'
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs'
import { createServer } from 'node:net'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import autocannon from 'autocannon'
import { report } from './report'

const entry = join(import.meta.dirname, '../.output/server/index.mjs')
if (!existsSync(entry)) { process.stderr.write('load benchmark skipped: run `npm run build` first\n'); process.exit(0) }
const dir = mkdtempSync(join(tmpdir(), 'crosspoint-load-'))
const dbUrl = `file:${join(dir, 'load.db')}`
const { seed } = await import('../scripts/seed')
await seed(dbUrl)
const port = await new Promise<number>((r) => { const s = createServer(); s.listen(0, '127.0.0.1', () => { const p = (s.address() as { port: number }).port; s.close(() => r(p)) }) })
const url = `http://127.0.0.1:${port}`
// LOAD_HEAP_MB caps the server's JavaScript heap: RSS that still grows then is native memory, not garbage
const heap = process.env.LOAD_HEAP_MB ? [`--max-old-space-size=${process.env.LOAD_HEAP_MB}`] : []
// LOAD_NODE_FLAGS adds flags for a diagnosis (e.g. --heapsnapshot-signal=SIGUSR2 to take heap snapshots mid-run)
const extra = (process.env.LOAD_NODE_FLAGS ?? '').split(' ').filter(Boolean)
const proc = spawn(process.execPath, [...heap, ...extra, '--trace-gc', entry], { env: { ...process.env, PORT: String(port), HOST: '127.0.0.1', NUXT_DATABASE_URL: dbUrl, NUXT_DATA_DIR: dir, AUTH_ORIGIN: `${url}/api/auth`, NUXT_AUTH_SECRET: 'bench-secret-not-for-production' }, stdio: ['ignore', 'pipe', 'ignore'] })
// "[pid:0x…]  41234 ms: Mark-Compact 180.2 (200.1) -> 95.3 (190.0) MB, …" (V8's --trace-gc line)
const fullGcs: { liveMb: number }[] = []
let measuring = false
let pending = ''
proc.stdout!.setEncoding('utf8').on('data', (chunk: string) => {
  pending += chunk
  const lines = pending.split('\n'); pending = lines.pop()!
  for (const line of lines) {
    const m = line.match(/Mark-Compact(?: \(reduce\))? [\d.]+ \([\d.]+\) -> ([\d.]+) \([\d.]+\) MB/)
    if (m && measuring) fullGcs.push({ liveMb: Number(m[1]) })
  }
})
for (let i = 0; i < 300; i++) {
  try { if ((await fetch(`${url}/api/v1/health`)).ok) break }
  catch { /* starting */ } await new Promise(r => setTimeout(r, 100))
}
const rss = () => Number(readFileSync(`/proc/${proc.pid}/status`, 'utf8').match(/VmRSS:\s+(\d+)/)![1]) / 1024
const ids = (await (await fetch(`${url}/api/v1/records?pageSize=200`)).json() as { items: { id: number }[] }).items.map(i => i.id)
const words = ['porphyrin', 'znp', 'benzonitril', 'viologen', 'acridinium', 'copper', 'imide', 'water']
let n = 0
const mix = [
  () => ({ method: 'GET', path: `/api/v1/records?q=${words[n % words.length]}&pageSize=20` }),
  () => ({ method: 'GET', path: `/api/v1/records/${ids[n % ids.length]}` }),
  () => ({ method: 'POST', path: '/api/v1/model/curve', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ model: 'semiclassical', temperatureK: 298.15, lambdaSolvent: 0.6, lambdaInternal: 0.3, vibrationEnergy: 0.18, coupling: 0.005, drivingForces: Array.from({ length: 200 }, (_, i) => -2 + i / 100) }) }),
  () => ({ method: 'GET', path: `/datasets/${2 + (n % 3)}` }),
  () => ({ method: 'GET', path: '/api/v1/datasets/12/bundle' }),
  () => ({ method: 'POST', path: '/api/auth/callback/credentials', headers: { 'content-type': 'application/x-www-form-urlencoded' }, body: `email=user${n}@example.org&password=wrong&csrfToken=x` })
]
// LOAD_SKIP=bundle,signin leaves kinds of request out, to find which one holds on to memory
const skip = (process.env.LOAD_SKIP ?? '').split(',').filter(Boolean)
const kinds = ['search', 'record', 'curve', 'page', 'bundle', 'signin']
const active = mix.filter((_, i) => !skip.includes(kinds[i]!))
// a desktop browser's user agent, so that page, record and bundle requests are counted as usage (COUNTER) like a person's
const BROWSER = 'Mozilla/5.0 (X11; Linux x86_64; rv:128.0) Gecko/20100101 Firefox/128.0'
const run = (duration: number) => autocannon({
  url, connections: 50, duration, headers: { 'user-agent': BROWSER },
  requests: [{ setupRequest: (req: Record<string, unknown>) => ({ ...req, ...active[n++ % active.length]!() }) }]
})
await run(Number(process.env.LOAD_WARMUP_SECONDS ?? 20))
measuring = true
const rssStart = rss()
const samples: number[] = [rssStart]
const sampler = setInterval(() => {
  try { samples.push(rss()) }
  catch { /* ended */ }
}, 5000)
const res = await run(Number(process.env.LOAD_SECONDS ?? 60))
const codes = res.statusCodeStats as Record<string, { count: number }>
const fiveXX = Object.entries(codes).filter(([c]) => c.startsWith('5')).reduce((s, [, v]) => s + v.count, 0)
const rssEnd = rss()
clearInterval(sampler)
const usage = await (await fetch(`${url}/api/v1/datasets/12/usage`)).json() as { requests: { total: number } }
proc.kill('SIGTERM')
const half = samples.slice(Math.floor(samples.length / 2))
// live heap after full collections: median of the first third against the median of the last third
// (medians: one collection that lands mid-burst, with a request's garbage still reachable, does not move them)
const third = Math.max(1, Math.floor(fullGcs.length / 3))
const median = (xs: { liveMb: number }[]) => { const v = xs.map(x => x.liveMb).sort((a, b) => a - b); return v.length ? (v[(v.length - 1) >> 1]! + v[v.length >> 1]!) / 2 : 0 }
const liveFirst = median(fullGcs.slice(0, third)); const liveLast = median(fullGcs.slice(-third))
report('load.mixed.requests_per_second', res.requests.average, '1/s', 0)
report('load.mixed.p50_ms', res.latency.p50, 'ms', 0)
report('load.mixed.p99_ms', res.latency.p99, 'ms', 0)
report('load.mixed.errors', fiveXX + res.errors + res.timeouts, 'count', 0)
report('load.mixed.rss_start_mb', rssStart, 'MB', 0)
report('load.mixed.rss_end_mb', rssEnd, 'MB', 0)
// stable memory: how much the RSS still grew over the second half of the run
report('load.mixed.rss_growth_second_half_mb', half.length > 1 ? Math.max(...half) - half[0]! : 0, 'MB', 0)
report('load.mixed.full_gcs', fullGcs.length, 'count', 0)
report('load.mixed.live_heap_first_third_mb', liveFirst, 'MB', 0)
// stable memory: the floor the heap returns to after full collections does not rise (≤ 20 MB over the run, common practice)
report('load.mixed.live_heap_growth_mb', liveLast - liveFirst, 'MB', 20)
process.stderr.write(`(live heap after each full GC: ${fullGcs.map(g => g.liveMb.toFixed(0)).join(' ')} MB)\n`)
process.stderr.write(`(RSS every 5 s: ${samples.map(x => x.toFixed(0)).join(' ')} MB)\n`)
process.stderr.write(`(dataset 12 usage: ${JSON.stringify(usage.requests)} requests after double-click filtering)\n`)
process.stderr.write(`(status codes: ${JSON.stringify(Object.fromEntries(Object.entries(codes).map(([k, v]) => [k, v.count])))})\n`)
rmSync(dir, { recursive: true, force: true })
