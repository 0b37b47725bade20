/** The shared-systems screens: the list, a system's forest plot, the record page's panel, and the curator's warning. */
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { api, DEMO, signIn, startServer, type TestServer } from '../helpers/server'
import { launch, newPage, shot, signInAs } from '../helpers/browser'

let s: TestServer
let browser: Browser
beforeAll(async () => { [s, browser] = await Promise.all([startServer({ seed: true }), launch()]) })
afterAll(async () => { await browser?.close(); await s?.stop() })

describe('systems measured by several labs', () => {
  it('lists them, draws a system\'s forest plot with the flagged lab, and links from a record', async () => {
    const { page, errors } = await newPage(browser)
    await page.goto(`${s.url}/systems?q=xylylene`, { waitUntil: 'networkidle' })
    expect(await page.locator('[data-test=systems] tbody tr').count()).toBe(4)
    await page.locator('[data-test=systems] tbody tr', { hasText: 'discrepancy' }).getByRole('link').click()
    await page.waitForSelector('[data-test=forest-plot] svg')
    expect(await page.locator('[data-test=system-discrepant]').textContent()).toContain('Discrepancy')
    expect(await page.locator('[data-test=system-consensus]').textContent()).toMatch(/log₁₀ k = \d+\.\d\d ± \d\.\d\d/)
    // six rows in the plot and the table; the two flagged ones drawn as squares
    expect(await page.locator('[data-test=system-records] tbody tr').count()).toBe(6)
    expect(await page.locator('[data-test=forest-plot] svg path').count()).toBeGreaterThanOrEqual(2)
    await shot(page, 'system')
    // a flagged record's page says so and links back
    await page.locator('[data-test=system-records] tbody tr', { hasText: 'discrepant' }).first().getByRole('link').first().click()
    await page.waitForSelector('[data-test=record-system]')
    expect(await page.locator('[data-test=record-system]').textContent()).toContain('Measured by 3 labs')
    expect(await page.locator('[data-test=record-system]').textContent()).toContain('a discrepancy')
    expect(errors).toEqual([])
  })
  it('a curator sees a submitted record that disagrees with a published system before accepting', async () => {
    const a = await signIn(s.url, DEMO.contributorA)
    const labA = (await api(s.url, '/api/v1/me', { headers: { cookie: a } })).data.user.labIds[0]
    const id = (await api(s.url, '/api/v1/datasets', { method: 'POST', headers: { cookie: a }, json: { labId: labA, title: 'A fifth look at a round-robin dyad (demo)' } })).data.id
    // a round-robin record of another lab, re-measured here 100× faster
    const sys = (await api(s.url, '/api/v1/systems?q=h2p+toluene+xylylene')).data.items[0]
    const ref = (await api(s.url, `/api/v1/systems/${sys.key}`)).data.records.find((r: any) => r.labName !== 'Faulkwood Ultrafast Lab')
    const record = (await api(s.url, `/api/v1/records/${ref.id}`)).data.data
    record.rate = { ...record.rate, value: record.rate.value * 100, uncertainty: record.rate.value * 100 * 0.15 }
    const add = await api(s.url, `/api/v1/datasets/${id}/records`, { method: 'POST', headers: { cookie: a }, json: { records: [record] } })
    expect(add.status).toBe(201)
    expect((await api(s.url, `/api/v1/datasets/${id}/submit`, { method: 'POST', headers: { cookie: a } })).status).toBe(200)
    const { page, errors } = await newPage(browser)
    await signInAs(page, s.url, DEMO.curatorB)
    await page.goto(`${s.url}/review/${id}`, { waitUntil: 'networkidle' })
    expect(await page.locator('[data-test=review-discrepancy]').textContent()).toContain('1 record lies more than 3 standard deviations')
    expect(await page.locator('[data-test=review-systems] tbody tr').count()).toBe(1)
    await shot(page, 'review-system-warning')
    // curators keep the synonym table from the systems page
    await page.goto(`${s.url}/systems`, { waitUntil: 'networkidle' })
    await page.locator('[data-test=synonym-panel] summary').click()
    await page.fill('#syn-alias', 'Zn-porphyrin donor')
    await page.fill('#syn-canonical', 'ZnP')
    await page.getByRole('button', { name: 'Add synonym' }).click()
    await page.waitForSelector('[data-test=synonym-panel] td:has-text("znporphyrindonor")')
    expect(await page.locator('[data-test=synonym-panel] [role=status]').textContent()).toContain('now counts as')
    await shot(page, 'systems-synonyms')
    expect(errors).toEqual([])
  })
})
