import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { api, DEMO, ROOT, signIn, startServer, type TestServer } from '../helpers/server'
import { launch, newPage, shot, signInAs } from '../helpers/browser'

let s: TestServer
let browser: Browser
let id = 0
let b = ''
beforeAll(async () => {
  [s, browser] = await Promise.all([startServer({ seed: true }), launch()])
  b = await signIn(s.url, DEMO.contributorB)
  const labB = (await api(s.url, '/api/v1/me', { headers: { cookie: b } })).data.user.labIds[0]
  id = (await api(s.url, '/api/v1/datasets', { method: 'POST', headers: { cookie: b }, json: { labId: labB, title: 'Round trip in the browser (demo)' } })).data.id
  const form = new FormData()
  form.append('file', new Blob([readFileSync(join(ROOT, 'tests/fixtures/deposit/good.csv'))]), 'good.csv')
  const up = await (await fetch(`${s.url}/api/v1/datasets/${id}/uploads/check`, { method: 'POST', body: form, headers: { cookie: b } })).json() as any
  await api(s.url, `/api/v1/datasets/${id}/uploads/${up.upload.id}/commit`, { method: 'POST', headers: { cookie: b }, json: { mode: 'append' } })
  expect((await api(s.url, `/api/v1/datasets/${id}/submit`, { method: 'POST', headers: { cookie: b } })).status).toBe(200)
}, 90_000)
afterAll(async () => { await browser?.close(); await s?.stop() })

describe('a curator returns, the contributor answers, the curator accepts', () => {
  it('goes round once and publishes with an identifier', async () => {
    const cur = await newPage(browser)
    await signInAs(cur.page, s.url, DEMO.curator)
    await cur.page.goto(`${s.url}/review`, { waitUntil: 'networkidle' })
    await cur.page.getByRole('link', { name: 'Round trip in the browser (demo)' }).click()
    await cur.page.waitForURL(new RegExp(`/review/${id}$`))
    await cur.page.fill('[data-test=comment-2]', 'Is this rate in ns⁻¹ really?')
    await cur.page.fill('[data-test=overall-comment]', 'One rate needs a second look.')
    await cur.page.click('[data-test=return]')
    await cur.page.waitForSelector('[data-test=review-outcome]')
    // the page follows the decision: no second set of buttons, the comment shown beside its record
    expect(await cur.page.locator('[data-test=return]').count()).toBe(0)
    expect(await cur.page.locator('[data-test=earlier-comment]').first().textContent()).toContain('Is this rate in ns⁻¹ really?')
    await shot(cur.page, 'review-returned')

    const con = await newPage(browser)
    await signInAs(con.page, s.url, DEMO.contributorB)
    await con.page.goto(`${s.url}/deposit/${id}`, { waitUntil: 'networkidle' })
    expect(await con.page.locator('[data-test=returned-note]').textContent()).toContain('One rate needs a second look.')
    expect(await con.page.locator('[data-test=curator-note-2]').textContent()).toBe('Is this rate in ns⁻¹ really?')
    await shot(con.page, 'contributor-sees-comments')
    const d = await api(s.url, `/api/v1/datasets/${id}/versions/1`, { headers: { cookie: b } })
    const rec = d.data.records[1]
    await api(s.url, `/api/v1/datasets/${id}/records/${rec.id}`, { method: 'PUT', headers: { cookie: b }, json: { record: { ...rec.data, rate: { value: 3.4e8, kind: 'unimolecular', method: 'direct' } } } })
    await con.page.reload({ waitUntil: 'networkidle' })
    con.page.once('dialog', d => void d.accept())
    await con.page.click('[data-test=submit-review]')
    await con.page.waitForFunction(() => document.body.textContent!.includes('Submitted for review'))

    await cur.page.goto(`${s.url}/review/${id}`, { waitUntil: 'networkidle' })
    expect(await cur.page.locator('[data-test=since-return]').textContent()).toContain('1 record changed (rows 2)')
    // the curator's comment from the return is still shown beside the record when the dataset comes back
    expect(await cur.page.locator('[data-test=earlier-comment]').first().textContent()).toContain('Is this rate in ns⁻¹ really?')
    await cur.page.click('[data-test=accept]')
    await cur.page.waitForSelector('[data-test=review-outcome]')
    expect(await cur.page.locator('[data-test=review-outcome]').textContent()).toBe(`Published as 10.99999/cp.${id}.v1.`)
    expect(await cur.page.locator('[data-test=accept]').count()).toBe(0)
    await shot(cur.page, 'review-accepted')

    const vis = await newPage(browser)
    await vis.page.goto(`${s.url}/datasets/${id}`, { waitUntil: 'networkidle' })
    expect(await vis.page.locator('[data-test=cite-box]').textContent()).toContain(`https://doi.org/10.99999/cp.${id}.v1`)
    const ld = JSON.parse((await vis.page.locator('script[type="application/ld+json"]').textContent())!)
    expect(ld).toMatchObject({ '@type': 'Dataset', 'name': 'Round trip in the browser (demo)', 'identifier': `https://doi.org/10.99999/cp.${id}.v1`, 'license': 'https://spdx.org/licenses/CC-BY-4.0.html' })
    await shot(vis.page, 'landing-published')
    for (const p of [cur, con, vis]) { expect(p.errors).toEqual([]); await p.page.close() }
  })
})
