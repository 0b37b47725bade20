/** Usage on the landing page and saved searches from Explore, in a real browser. */
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { api, DEMO, signIn, startServer, type TestServer } from '../helpers/server'
import { launch, shot, signInAs } from '../helpers/browser'

let s: TestServer
let browser: Browser
beforeAll(async () => { [s, browser] = await Promise.all([startServer({ seed: true }), launch()]) })
afterAll(async () => { await browser?.close(); await s?.stop() })

// headless Chromium names itself "HeadlessChrome", which the robot list excludes: these visits pose as a desktop browser
const DESKTOP = 'Mozilla/5.0 (X11; Linux x86_64) AppleWebKit/537.36 (KHTML, like Gecko) Chrome/131.0.0.0 Safari/537.36'

describe('usage and saved searches in the browser', () => {
  it('the landing page shows views and downloads, and a visit is counted', async () => {
    const before = (await api(s.url, '/api/v1/datasets/2/usage')).data.investigations.total
    const page = await (await browser.newContext({ userAgent: DESKTOP, viewport: { width: 1360, height: 900 } })).newPage()
    await page.goto(`${s.url}/datasets/2`, { waitUntil: 'networkidle' })
    const panel = page.locator('[data-test=usage]')
    await panel.locator('svg').waitFor()
    // the page's own visit was counted (one investigation, however many calls the page made)
    const after = (await api(s.url, '/api/v1/datasets/2/usage')).data
    expect(after.investigations.total).toBe(before + 1)
    await page.reload({ waitUntil: 'networkidle' })
    await panel.locator('svg').waitFor()
    expect(await panel.textContent()).toMatch(new RegExp(`${after.investigations.total}\\s*views`))
    expect(await panel.locator('table tbody tr').count()).toBe(12)
    await shot(page, 'usage-panel')
    // a headless robot's visit is not
    const robot = await browser.newPage()
    await robot.goto(`${s.url}/datasets/2`, { waitUntil: 'networkidle' })
    expect((await api(s.url, '/api/v1/datasets/2/usage')).data.investigations.total).toBe(after.investigations.total)
  })
  it('a contributor saves the current search from Explore and finds it on the account page', async () => {
    const ctx = await browser.newContext({ viewport: { width: 1360, height: 900 } })
    const page = await ctx.newPage()
    await signInAs(page, s.url, DEMO.contributorB)
    await page.goto(`${s.url}/explore?q=porphyrin&solvent=toluene`, { waitUntil: 'networkidle' })
    await page.getByRole('button', { name: 'Save this search' }).click()
    await expect.poll(() => page.locator('#saved-search-name').inputValue()).toBe('porphyrin')
    await page.fill('#saved-search-name', 'Porphyrins in toluene')
    await page.getByRole('button', { name: 'Save', exact: true }).click()
    await page.getByText('New matches will be mailed to you').waitFor()
    await shot(page, 'save-search')
    const b = await signIn(s.url, DEMO.contributorB)
    const saved = (await api(s.url, '/api/v1/account/saved-searches', { headers: { cookie: b } })).data.items
    expect(saved.map((x: any) => [x.name, x.query, x.alerts])).toEqual([['Porphyrins in toluene', { q: 'porphyrin', solvent: 'toluene' }, true]])
    await page.getByRole('link', { name: 'Your saved searches' }).click()
    const row = page.locator('[data-test=saved-searches] tbody tr', { hasText: 'Porphyrins in toluene' })
    await row.waitFor()
    expect(await row.textContent()).toContain('“porphyrin”; solvent toluene')
    // mails off from the list, then the search opens Explore with its filters
    await row.getByRole('button', { name: 'Mails for Porphyrins in toluene: on' }).click()
    await page.getByText('Mails for “Porphyrins in toluene” stopped.').waitFor()
    await shot(page, 'saved-searches')
    await row.getByRole('link', { name: 'Porphyrins in toluene' }).click()
    await page.waitForURL(u => u.pathname === '/explore' && u.searchParams.get('solvent') === 'toluene')
    expect(await page.locator('#q').inputValue()).toBe('porphyrin')
  })
})
