// npm run bench [-- word]: each group of benchmarks runs in its own process (so peak-memory figures
// belong to that work alone) and prints one JSON line per figure. Benchmarks never fail a build.
import { spawnSync } from 'node:child_process'

const word = process.argv[2] ?? ''
const groups = [
  { file: 'bench/model-run.ts', names: ['model.curve.points_per_second', 'model.fit28.median_ms', 'model.fit5000.median_ms'] },
  { file: 'bench/decay.ts', names: ['decay.fit5000_gaussian.median_ms', 'decay.fit5000_gaussian.max_ms', 'decay.fit5000_measured400.median_ms'] },
  { file: 'bench/mapping.ts', names: ['upload.mapped100k.seconds', 'upload.mapped100k.peak_mb'] },
  { file: 'bench/upload.ts', names: ['upload.check100k.seconds', 'upload.check100k.peak_mb'] },
  { file: 'bench/search.ts', names: ['search.build100k.seconds', 'search.query.p95_ms', 'search.http.requests_per_second', 'search.http.distinct_rps', 'search.server.rss_mb'] },
  { file: 'bench/scale.ts', names: ['search.build1m.seconds', 'search.query1m.p95_ms', 'search.reindex1m.ms', 'server.start1m.seconds', 'search.server1m.rss_mb', 'bundle.records1m.seconds', 'bundle.records1m.rss_growth_mb'] },
  { file: 'bench/bundle.ts', names: ['bundle.records100k.seconds', 'bundle.records100k.rss_growth_mb'] },
  { file: 'bench/compare.ts', names: ['compare.redraw5000.ms'] },
  { file: 'bench/dataset-page.ts', names: ['dataset.page10k.median_ms', 'dataset.page10k.p95_ms', 'dataset.api10k.median_ms', 'usage.landing.added_ms', 'usage.api.added_ms'] },
  { file: 'bench/systems.ts', names: ['systems.first100k.ms', 'systems.list100k.p95_ms', 'systems.search100k.p95_ms', 'systems.detail100k.p95_ms', 'systems.record100k.p95_ms'] },
  { file: 'bench/load.ts', names: ['load.mixed.requests_per_second', 'load.mixed.p50_ms', 'load.mixed.p99_ms', 'load.mixed.errors', 'load.mixed.rss_start_mb', 'load.mixed.rss_end_mb', 'load.mixed.rss_growth_second_half_mb', 'load.mixed.full_gcs', 'load.mixed.live_heap_first_third_mb', 'load.mixed.live_heap_growth_mb'] }
]
for (const g of groups) {
  if (word && !g.names.some(n => n.includes(word))) continue
  spawnSync('npx', ['tsx', g.file, word], { stdio: 'inherit' })
}
