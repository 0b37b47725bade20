// npm test: build the production server once (API and browser tests run against it), then run
// every vitest project (unit, api, browser). Extra arguments go to vitest.
import { spawnSync } from 'node:child_process'

const run = (cmd, args) => {
  const r = spawnSync(cmd, args, { stdio: 'inherit', env: { ...process.env, NUXT_TELEMETRY_DISABLED: '1' } })
  if (r.status !== 0) process.exit(r.status ?? 1)
}
if (!process.env.SKIP_BUILD) run('npx', ['nuxt', 'build'])
run('npx', ['vitest', 'run', ...process.argv.slice(2)])
