/** What people do on the screens reworked for plain use: comparison from a record page, shared links, paged datasets. */
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { startServer, type TestServer } from '../helpers/server'
import { launch, newPage, shot } from '../helpers/browser'

let s: TestServer
let browser: Browser
beforeAll(async () => { [s, browser] = await Promise.all([startServer({ seed: true }), launch()]) })
afterAll(async () => { await browser?.close(); await s?.stop() })

describe('comparison from anywhere', () => {
  it('adds a record from its page, lists it on Compare, and takes it out again', async () => {
    const { page, errors } = await newPage(browser)
    await page.goto(`${s.url}/records/200`, { waitUntil: 'networkidle' })
    await page.click('[data-test=toggle-compare]')
    expect(await page.locator('[data-test=toggle-compare]').textContent()).toContain('Remove from the comparison')
    await page.goto(`${s.url}/compare`, { waitUntil: 'networkidle' })
    await page.waitForSelector('[data-test=selection-list]')
    await page.click('[data-test=selection-list] summary')
    expect(await page.locator('[data-test=selection-list] tbody tr').count()).toBe(1)
    await shot(page, 'compare-one-record')
    await page.getByRole('button', { name: 'Remove record 200 from the comparison' }).click()
    await page.waitForSelector('[data-test=compare-empty]')
    // an empty comparison still draws the model, with its legend
    expect(await page.locator('[data-test=curve-legend] li').count()).toBeGreaterThan(0)
    expect(await page.locator('[data-test=caption]').textContent()).toContain('no archive records selected')
    expect(errors).toEqual([])
  })
  it('a shared link carries the map view and the toggles', async () => {
    const { page } = await newPage(browser)
    await page.goto(`${s.url}/compare?ids=200&view=map&terms=1&cl=0`, { waitUntil: 'networkidle' })
    await page.waitForSelector('[data-test=rate-map] svg')
    expect(new URL(page.url()).searchParams.get('view')).toBe('map')
    expect(new URL(page.url()).searchParams.get('terms')).toBe('1')
    expect(new URL(page.url()).searchParams.get('cl')).toBe('0')
    // the energy unit travels with the link, and the map's axes follow it
    await page.selectOption('#unit', 'cm-1')
    await page.waitForURL(u => u.searchParams.get('unit') === 'cm-1')
    await page.waitForFunction(() => document.querySelector('[data-test=rate-map]')?.textContent?.includes('λ_s (cm⁻¹)'))
    const { page: p2 } = await newPage(browser)
    await p2.goto(page.url(), { waitUntil: 'networkidle' })
    expect(await p2.locator('#unit').inputValue()).toBe('cm-1')
    expect(await p2.locator('[data-test=rate-map]').textContent()).toContain('−ΔG° (cm⁻¹)')
  })
  it('adds every search match, not only the page shown, and a record with its similar systems', async () => {
    const { page, errors } = await newPage(browser)
    await page.goto(`${s.url}/explore?pageSize=10`, { waitUntil: 'networkidle' })
    const total = Number((await page.locator('[data-test=total]').textContent())!.replace(/[^\d]/g, ''))
    expect(total).toBeGreaterThan(10)
    await page.click('[data-test=add-to-compare]')
    await page.waitForURL(/\/compare/)
    await page.waitForFunction(n => new URL(location.href).searchParams.get('ids')?.split(',').length === n, Math.min(total, 5000))
    // a record page: the similar systems can be added one by one or all at once
    await page.evaluate(() => localStorage.removeItem('crosspoint.compare.ids'))
    await page.goto(`${s.url}/records/200`, { waitUntil: 'networkidle' })
    await page.waitForSelector('[data-test=similar] tbody tr')
    const similar = await page.locator('[data-test=similar] tbody tr').count()
    const first = page.locator('[data-test=similar-compare]').first()
    await first.click()
    expect(await first.getAttribute('aria-pressed')).toBe('true')
    await page.click('[data-test=similar-compare-all]')
    expect(await page.getByRole('link', { name: /Open the comparison/ }).textContent()).toContain(`${similar + 1} records`)
    expect(errors).toEqual([])
  })
})

describe('search', () => {
  it('suggests the word meant when one is misspelt, and the suggestion searches', async () => {
    const { page } = await newPage(browser)
    await page.goto(`${s.url}/explore?q=benzonitirle`, { waitUntil: 'networkidle' })
    const hint = page.locator('[data-test=did-you-mean]')
    expect(await hint.textContent()).toContain('benzonitrile')
    await hint.getByRole('button').click()
    await page.waitForURL(u => u.searchParams.get('q') === 'benzonitrile')
    await page.waitForFunction(() => !document.querySelector('[data-test=did-you-mean]'))
  })
})

describe('dataset pages', () => {
  it('pages the records on the server, 50 at a time, with the page in the URL', async () => {
    const { page } = await newPage(browser)
    await page.goto(`${s.url}/datasets/2`, { waitUntil: 'networkidle' })
    const pager = page.locator('[data-test=record-pages]')
    expect(await pager.textContent()).toMatch(/Records 1–50 of [\d,]+/)
    const first = await page.locator('table[aria-label] tbody tr, .dense-table tbody tr').first().textContent()
    await pager.getByRole('button', { name: /Next/ }).click()
    await page.waitForURL(u => u.searchParams.get('page') === '2')
    await page.waitForFunction(() => /Records 51–100/.test(document.querySelector('[data-test=record-pages]')?.textContent ?? ''))
    expect(await page.locator('.dense-table tbody tr').first().textContent()).not.toBe(first)
    expect(await page.locator('.dense-table tbody tr').count()).toBeLessThanOrEqual(60)
  })
})
