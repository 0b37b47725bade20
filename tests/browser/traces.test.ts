/**
 * From a decay trace to a cited rate, in the browser: a contributor attaches a trace to a draft, fits it with a
 * Gaussian instrument response, takes a record's rate from the fit and submits; the curator sees the trace, the
 * fit and the check of the stated rate on the review page; once published, the bundle carries the trace file
 * under its checksum.
 */
import { createHash } from 'node:crypto'
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import AdmZip from 'adm-zip'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { api, DEMO, ROOT, signIn, startServer, type TestServer } from '../helpers/server'
import { launch, newPage, shot, signInAs } from '../helpers/browser'

const ref = JSON.parse(readFileSync(join(ROOT, 'tests/fixtures/kinetics/decay-scipy.json'), 'utf8'))
const c = ref.cases.find((x: any) => x.name === 'mono, Gaussian IRF fitted')
const body = 'time (ns),counts\n' + c.times.map((t: number, i: number) => `${t},${c.signal[i]}`).join('\n') + '\n'
const file = join(mkdtempSync(join(tmpdir(), 'crosspoint-trace-')), 'znp-c60-650nm.csv')
writeFileSync(file, body)

let s: TestServer
let browser: Browser
let id = 0
beforeAll(async () => {
  ;[s, browser] = await Promise.all([startServer({ seed: true }), launch()])
  const a = await signIn(s.url, DEMO.contributorA)
  const labA = (await api(s.url, '/api/v1/me', { headers: { cookie: a } })).data.user.labIds[0]
  id = (
    await api(s.url, '/api/v1/datasets', {
      method: 'POST',
      headers: { cookie: a },
      json: { labId: labA, title: 'A rate from its trace (browser test)' }
    })
  ).data.id
  const first = (await api(s.url, '/api/v1/records?pageSize=1')).data.items[0].id
  const record = (await api(s.url, `/api/v1/records/${first}`)).data.data
  await api(s.url, `/api/v1/datasets/${id}/records`, { method: 'POST', headers: { cookie: a }, json: { records: [record] } })
  await api(s.url, `/api/v1/datasets/${id}`, {
    method: 'PATCH',
    headers: { cookie: a },
    json: {
      creators: [{ name: 'Faulkwood, Imre', nameType: 'Personal', familyName: 'Faulkwood', givenName: 'Imre' }],
      keywords: ['demo']
    }
  })
}, 90_000)
afterAll(async () => {
  await browser?.close()
  await s?.stop()
})

describe('a rate from its decay trace', () => {
  it('attach, fit, take the rate, submit; the curator sees the trace; the bundle carries it', async () => {
    const { page, errors } = await newPage(browser)
    await signInAs(page, s.url, DEMO.contributorA)
    await page.goto(`${s.url}/deposit/${id}`, { waitUntil: 'networkidle' })
    await page.setInputFiles('#trace-file', file)
    await page.selectOption('#trace-signal', 'emission')
    await page.fill('#trace-wavelength', '650')
    await page.getByRole('button', { name: 'Attach trace' }).click()
    await page.getByText('znp-c60-650nm.csv attached: 1000 points.').waitFor()
    await page.getByRole('radio', { name: 'Fit znp-c60-650nm.csv' }).check()
    await page.selectOption('#fit-irf', 'gaussian')
    await page.getByRole('button', { name: 'Fit this trace' }).click()
    const table = page.locator('[data-test=decay-fit]')
    await table.waitFor()
    expect(await table.textContent()).toContain('Converged')
    // the lifetime SciPy finds for this trace, to the four digits shown
    expect(await table.locator('tr', { hasText: 'lifetime τ₁' }).textContent()).toContain(c.scipy.tau1.value.toPrecision(4))
    await page.locator('[data-test=decay-plot] svg').first().waitFor()
    await page.getByRole('button', { name: 'Take the rate from this fit' }).click()
    await page.getByText(/Record 1: k = .* s⁻¹ \(k = 1\/τ\)/).waitFor()
    await shot(page, 'trace-panel')
    page.once('dialog', d => d.accept())
    await page.getByRole('button', { name: 'Submit for review' }).click()
    await page.getByText('Submitted for review').waitFor()
    expect(errors).toEqual([])

    const cur = await newPage(browser)
    await signInAs(cur.page, s.url, DEMO.curatorB)
    await cur.page.goto(`${s.url}/review/${id}`, { waitUntil: 'networkidle' })
    const panel = cur.page.locator('[data-test=review-traces]')
    await panel.locator('[data-test=decay-plot] svg').first().waitFor()
    expect(await panel.textContent()).toContain('znp-c60-650nm.csv')
    expect(await panel.locator('[data-test=provenance-check]').textContent()).toMatch(
      /The fit gives k = .* s⁻¹; the record states/
    )
    expect(await panel.locator('[data-test=provenance-check]').textContent()).not.toContain('disagree')
    await shot(cur.page, 'review-trace')
    expect(cur.errors).toEqual([])

    const curator = await signIn(s.url, DEMO.curatorB)
    const view = (await api(s.url, `/api/v1/review/${id}`, { headers: { cookie: curator } })).data
    expect(
      (
        await api(s.url, `/api/v1/review/${id}/accept`, {
          method: 'POST',
          headers: { cookie: curator },
          json: { expectedUpdatedAt: view.version.updatedAt }
        })
      ).status
    ).toBe(200)
    const zip = new AdmZip(Buffer.from(await (await fetch(`${s.url}/api/v1/datasets/${id}/bundle`)).arrayBuffer()))
    const h = createHash('sha256').update(body).digest('hex')
    expect(
      zip
        .getEntries()
        .find(e => e.entryName.endsWith(`data/traces/${h}.csv`))
        ?.getData()
        .toString()
    ).toBe(body)
    expect(
      zip
        .getEntries()
        .find(e => e.entryName.endsWith('manifest-sha256.txt'))!
        .getData()
        .toString()
    ).toContain(`${h}  data/traces/${h}.csv`)
  })
})
