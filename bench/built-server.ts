/** Starts the built server on a free port over a given database file and data folder, for the HTTP benchmarks. */
import { spawn } from 'node:child_process'
import { createServer } from 'node:net'

export async function freePort (): Promise<number> {
  return new Promise<number>((resolve) => {
    const s = createServer()
    s.listen(0, '127.0.0.1', () => {
      const p = (s.address() as { port: number }).port
      s.close(() => resolve(p))
    })
  })
}

/** Resolves once /api/v1/health answers (at most `seconds`); `stop` ends the server. */
export async function startBuilt (entry: string, dataDir: string, seconds = 60): Promise<{ url: string, stop: () => void }> {
  const port = await freePort()
  const url = `http://127.0.0.1:${port}`
  const proc = spawn(process.execPath, [entry], {
    env: { ...process.env, PORT: String(port), HOST: '127.0.0.1', AUTH_ORIGIN: `${url}/api/auth`, NUXT_DATA_DIR: dataDir,
      NUXT_AUTH_SECRET: 'bench-secret-not-for-production' },
    stdio: 'ignore'
  })
  for (let i = 0; i < seconds * 10; i++) {
    try {
      if ((await fetch(`${url}/api/v1/health`)).ok) break
    }
    catch { /* starting */ }
    await new Promise(r => setTimeout(r, 100))
  }
  return { url, stop: () => proc.kill('SIGTERM') }
}
