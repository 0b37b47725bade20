// Takes screenshots of pages of a running server: node scripts/shot.mjs http://127.0.0.1:3000 /path [/path…]
import { chromium } from 'playwright-core'

const [base, ...paths] = process.argv.slice(2)
const browser = await chromium.launch({ executablePath: '/usr/bin/chromium', headless: true, args: ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'] })
const page = await browser.newPage({ viewport: { width: Number(process.env.SHOT_WIDTH ?? 1360), height: 900 } })
const errors = []
page.on('console', (m) => { if (m.type() === 'error') errors.push(`${page.url()}: ${m.text()}`) })
page.on('pageerror', e => errors.push(`${page.url()}: ${e.message}`))
if (process.env.SHOT_USER) {
  await page.goto(base + '/signin')
  await page.fill('#email', process.env.SHOT_USER); await page.fill('#password', 'crosspoint-demo')
  await page.click('button[type=submit]'); await page.waitForURL(u => !u.pathname.startsWith('/signin'))
}
for (const p of paths) {
  await page.goto(base + p, { waitUntil: 'networkidle' })
  await page.waitForTimeout(600)
  const name = (p.replace(/[^a-z0-9]+/gi, '_') || 'home').slice(0, 40)
  await page.screenshot({ path: `/tmp/shot${name}.png`, fullPage: true })
  console.log('shot', p, `/tmp/shot${name}.png`)
}
console.log('console errors:', errors.length ? errors.join('\n') : 'none')
await browser.close()
