/** Headless Debian chromium through playwright-core; screenshots go to tests/.artifacts (git-ignored). */
import { mkdirSync } from 'node:fs'
import { join } from 'node:path'
import { chromium, type Browser, type Page } from 'playwright-core'
import { ROOT } from './server'

export const ARTIFACTS = join(ROOT, 'tests/.artifacts')

export async function launch (): Promise<Browser> {
  mkdirSync(ARTIFACTS, { recursive: true })
  return chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
    headless: true,
    args: ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync']
  })
}

/** A page that records console errors and uncaught exceptions. */
export async function newPage (browser: Browser): Promise<{ page: Page, errors: string[] }> {
  const page = await browser.newPage({ viewport: { width: 1360, height: 900 } })
  const errors: string[] = []
  page.on('console', (m) => { if (m.type() === 'error') errors.push(`${page.url()} console: ${m.text()}`) })
  page.on('pageerror', (e) => { errors.push(`${page.url()} pageerror: ${e.message}`) })
  return { page, errors }
}

export async function shot (page: Page, name: string): Promise<void> {
  await page.screenshot({ path: join(ARTIFACTS, `${name}.png`), fullPage: true })
}

export async function signInAs (page: Page, base: string, email: string): Promise<void> {
  await page.goto(`${base}/signin`)
  await page.fill('#email', email)
  await page.fill('#password', 'crosspoint-demo')
  await page.click('button[type=submit]')
  await page.waitForURL(u => !u.pathname.startsWith('/signin'))
}
