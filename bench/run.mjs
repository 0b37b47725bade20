// npm run bench [-- word]: runs the benchmarks (TypeScript through tsx) and prints JSON lines.
import { spawnSync } from 'node:child_process'
const r = spawnSync('npx', ['tsx', 'bench/all.ts', ...process.argv.slice(2)], { stdio: 'inherit' })
process.exit(r.status ?? 0)
