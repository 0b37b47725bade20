import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { api, startServer, type TestServer } from '../helpers/server'
import { launch, newPage, shot, signInAs } from '../helpers/browser'

let s: TestServer
let browser: Browser
beforeAll(async () => { [s, browser] = await Promise.all([startServer({ seed: true }), launch()]) })
afterAll(async () => { await browser?.close(); await s?.stop() })

describe('pages a visitor sees', () => {
  it.each(['/', '/explore', '/datasets', '/datasets/2', '/records/200', '/model', '/signin'])('%s renders without console errors', async (path) => {
    const { page, errors } = await newPage(browser)
    const res = await page.goto(s.url + path, { waitUntil: 'networkidle' })
    expect(res?.status()).toBe(200)
    await page.waitForTimeout(300)
    await shot(page, `visitor${path.replace(/\W+/g, '_')}`)
    expect(errors).toEqual([])
    expect(await page.locator('h1').first().textContent()).toBeTruthy()
    await page.close()
  })
  it('a record with SMILES shows its structures drawn by RDKit, and similar systems by structure', async () => {
    const { page, errors } = await newPage(browser)
    const hit = (await api(s.url, '/api/v1/records?q=dimethoxynaphthalene&pageSize=1')).data.items[0]
    await page.goto(`${s.url}/records/${hit.id}`, { waitUntil: 'networkidle' })
    const figs = page.locator('[data-test=structures] figure')
    expect(await figs.count()).toBe(2)
    expect(await figs.first().locator('img').getAttribute('src')).toMatch(/^data:image\/svg\+xml;base64,/)
    expect(await figs.first().locator('img').evaluate((i: HTMLImageElement) => i.complete && i.naturalWidth > 0)).toBe(true)
    expect(await page.locator('[data-test=structures]').textContent()).toMatch(/InChIKey\s*[A-Z]{14}-[A-Z]{10}-[A-Z]/)
    await page.waitForSelector('[data-test=similar] tbody tr')
    expect(await page.locator('[data-test=similar]').textContent()).toContain('Tanimoto')
    await shot(page, 'visitor_record_structures')
    expect(errors).toEqual([])
    await page.close()
  })
  it('the overview shows the archive counts and draws the plot of every published record', async () => {
    const { page } = await newPage(browser)
    await page.goto(s.url + '/', { waitUntil: 'networkidle' })
    const health = await api(s.url, '/api/v1/overview')
    const counts = await page.locator('[data-test=counts] dd').allTextContents()
    expect(counts.map(c => Number(c.replace(/,/g, '')))).toEqual([health.data.counts.labs, health.data.counts.datasets, health.data.counts.records])
    await page.waitForSelector('[data-test=rate-plot] svg circle')
    expect(await page.locator('[data-test=rate-plot] svg circle').count()).toBeGreaterThan(500)
    await page.close()
  })
  it('explore: a facet click narrows the list and lands in the URL', async () => {
    const { page } = await newPage(browser)
    await page.goto(s.url + '/explore', { waitUntil: 'networkidle' })
    const before = Number((await page.locator('[data-test=total]').textContent())!.replace(/\D/g, ''))
    await page.getByRole('button', { name: /^water/ }).click()
    await page.waitForURL(/solvent=water/)
    await page.waitForFunction(b => Number(document.querySelector('[data-test=total]')!.textContent!.replace(/\D/g, '')) < b, before)
    const after = Number((await page.locator('[data-test=total]').textContent())!.replace(/\D/g, ''))
    const apiTotal = (await api(s.url, '/api/v1/records?solvent=water&pageSize=1')).data.total
    expect(after).toBe(apiTotal)
    await page.close()
  })
  it('model page: fitting the example points shows the API\'s numbers', async () => {
    const { page, errors } = await newPage(browser)
    await page.goto(s.url + '/model', { waitUntil: 'networkidle' })
    await page.getByRole('button', { name: 'Load example points' }).click()
    const [resp] = await Promise.all([
      page.waitForResponse(r => r.url().endsWith('/api/v1/model/fit')),
      page.click('[data-test=run-fit]')
    ])
    const body = await resp.json()
    await page.waitForSelector('[data-test=fit-result]')
    const shown = await page.locator('[data-test=fit-lambdaSolvent]').textContent()
    expect(shown).toBe(body.parameters.lambdaSolvent.value.toPrecision(4)) // every fitted value is in eV (the column header says so)
    expect(await page.locator('[data-test=fit-chi2]').textContent()).toBe(body.chiSquaredReduced.toFixed(3))
    await shot(page, 'model-fit')
    expect(errors).toEqual([])
    await page.close()
  })
})

describe('signed in', () => {
  it('a contributor signs in, sees their name and their lab\'s draft in the dataset list', async () => {
    const { page, errors } = await newPage(browser)
    await signInAs(page, s.url, 'imre.faulkwood@brightwater.example')
    await page.goto(s.url + '/datasets?state=draft', { waitUntil: 'networkidle' })
    expect(await page.locator('[data-test=whoami]').textContent()).toContain('Imre Faulkwood')
    const rows = await page.locator('tbody tr').allTextContents()
    expect(rows.length).toBeGreaterThan(0)
    for (const r of rows) expect(r).toContain('Faulkwood Ultrafast Lab')
    await shot(page, 'contributor-drafts')
    expect(errors).toEqual([])
    await page.close()
  })
})
