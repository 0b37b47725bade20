/**
 * Browser benchmark: the compare view with 5 000 points on screen; time from a parameter change
 * to the redrawn figure (median of 15 changes), in headless Debian chromium against the built server.
 */
import { spawn } from 'node:child_process'
import { existsSync, mkdtempSync, rmSync } from 'node:fs'
import { createServer } from 'node:net'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { chromium } from 'playwright-core'
import { report } from './report'

const entry = join(import.meta.dirname, '../.output/server/index.mjs')
if (!existsSync(entry) || !existsSync('/usr/bin/chromium')) { process.stderr.write('compare benchmark skipped: needs `npm run build` and /usr/bin/chromium\n'); process.exit(0) }
const dir = mkdtempSync(join(tmpdir(), 'crosspoint-compare-bench-'))
const port = await new Promise<number>((r) => { const s = createServer(); s.listen(0, '127.0.0.1', () => { const p = (s.address() as { port: number }).port; s.close(() => r(p)) }) })
const url = `http://127.0.0.1:${port}`
const proc = spawn(process.execPath, [entry], { env: { ...process.env, PORT: String(port), HOST: '127.0.0.1', NUXT_DATABASE_URL: `file:${join(dir, 'c.db')}`, NUXT_DATA_DIR: dir, AUTH_ORIGIN: `${url}/api/auth`, NUXT_AUTH_SECRET: 'bench-secret-not-for-production' }, stdio: 'ignore' })
for (let i = 0; i < 300; i++) {
  try { if ((await fetch(`${url}/api/v1/health`)).ok) break }
  catch { /* starting */ } await new Promise(r => setTimeout(r, 100))
}
const browser = await chromium.launch({ executablePath: '/usr/bin/chromium', headless: true, args: ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'] })
const page = await browser.newPage({ viewport: { width: 1360, height: 900 } })
await page.goto(`${url}/signin`)
// 5 000 invented points (kept in the browser like a researcher's own)
await page.evaluate(() => {
  const pts = Array.from({ length: 5000 }, (_, i) => ({ deltaG: -2.4 + 2.6 * (i / 4999), log10Rate: 8 + 3 * Math.sin(i / 400) + ((i * 7919) % 100) / 100, label: 'bench' }))
  localStorage.setItem('crosspoint.compare.own', JSON.stringify(pts))
  localStorage.setItem('crosspoint.compare.ids', '[]')
})
await page.goto(`${url}/compare`, { waitUntil: 'networkidle' })
await page.waitForFunction(() => document.querySelectorAll('[data-test=rate-plot] svg circle').length >= 5000, undefined, { timeout: 60_000 })
const times: number[] = []
for (let k = 0; k < 16; k++) {
  const ms = await page.evaluate(value => new Promise<number>((resolve) => {
    const host = document.querySelector('[data-test=rate-plot]')!
    const input = document.querySelector<HTMLInputElement>('input[aria-label^="λ_s solvent reorganization"]')!
    const t0 = performance.now()
    const obs = new MutationObserver(() => {
      if (host.querySelector('svg') && host.querySelectorAll('svg circle').length >= 5000) { obs.disconnect(); requestAnimationFrame(() => resolve(performance.now() - t0)) }
    })
    obs.observe(host, { childList: true })
    input.value = String(value)
    input.dispatchEvent(new Event('input', { bubbles: true }))
  }), 0.5 + (k % 8) * 0.05)
  if (k > 0) times.push(ms)
}
times.sort((a, b) => a - b)
report('compare.redraw5000.ms', times[Math.floor(times.length / 2)]!, 'ms', 100)
await browser.close()
proc.kill('SIGTERM')
rmSync(dir, { recursive: true, force: true })
