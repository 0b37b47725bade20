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
