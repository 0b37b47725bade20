// npm run demo: build the production server, migrate and seed the embedded SQLite file, print the
// demo sign-ins and serve on http://localhost:3000 (PORT to change). Ctrl-C stops it.
import { spawn, spawnSync } from 'node:child_process'

const port = process.env.PORT ?? '3000'
const base = process.env.NUXT_PUBLIC_BASE_URL ?? `http://localhost:${port}`
const env = {
  ...process.env,
  NUXT_TELEMETRY_DISABLED: '1',
  NUXT_DATABASE_URL: process.env.NUXT_DATABASE_URL ?? 'file:./data/crosspoint.db',
  NUXT_DATA_DIR: process.env.NUXT_DATA_DIR ?? './data',
  AUTH_ORIGIN: process.env.AUTH_ORIGIN ?? `${base}/api/auth`,
  NUXT_PUBLIC_BASE_URL: base,
  PORT: port,
  // the demo runs with the demo session secret on purpose; any other production start refuses it
  CROSSPOINT_DEMO: '1'
}
const step = (label, cmd, args) => {
  process.stdout.write(`\n▸ ${label}\n`)
  const r = spawnSync(cmd, args, { stdio: 'inherit', env })
  if (r.status !== 0) { process.stderr.write(`✗ ${label} failed\n`); process.exit(r.status ?? 1) }
}
step('Building the production server', 'npx', ['nuxt', 'build'])
step('Migrating and seeding the demo scenario (invented data)', 'npx', ['tsx', 'scripts/seed.ts'])
process.stdout.write(`
Crosspoint demo — every lab, person and number in it is invented.
Sign in at ${base}/signin with password "crosspoint-demo" as:
  contributor  imre.faulkwood@brightwater.example     (Faulkwood Ultrafast Lab, lead)
  contributor  sunniva.orrel@lindqvale.example        (Orrel Solar-Fuels Group, lead)
  contributor  kasimir.delacombe@marrowfield.example  (Delacombe Bio-ET Lab, lead)
  curator      pia.veldhaus@brightwater.example        (member of Faulkwood Ultrafast Lab)
  curator      ansel.moravec@lindqvale.example         (member of Orrel Solar-Fuels Group)
  admin        rowan.tessaly@crosspoint.example

▸ Serving on ${base}
`)
const server = spawn(process.execPath, ['.output/server/index.mjs'], { stdio: 'inherit', env })
const stop = () => server.kill('SIGTERM')
process.on('SIGINT', stop)
process.on('SIGTERM', stop)
server.on('exit', code => process.exit(code ?? 0))
