import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { api, DEMO, ROOT, signIn, startServer, type TestServer } from '../helpers/server'
import { launch, newPage, shot, signInAs } from '../helpers/browser'

let s: TestServer
let browser: Browser
beforeAll(async () => { [s, browser] = await Promise.all([startServer({ seed: true }), launch()]) })
afterAll(async () => { await browser?.close(); await s?.stop() })

describe('a contributor deposits a dataset', () => {
  it('starts a draft, uploads a file in two steps, adds a record by hand with a derived rate, and submits', async () => {
    const { page, errors } = await newPage(browser)
    await signInAs(page, s.url, DEMO.contributorA)
    await page.goto(`${s.url}/deposit`, { waitUntil: 'networkidle' })
    await page.fill('#new-title', 'Browser deposit (demo)')
    await page.click('[data-test=create-dataset]')
    await page.waitForURL(/\/deposit\/\d+$/)
    const id = Number(page.url().split('/').pop())

    // a file with a problem: reported by row and column, nothing added
    await page.setInputFiles('[data-test=upload-input]', join(ROOT, 'tests/fixtures/deposit/second-row-bad.csv'))
    await page.waitForSelector('[data-test=upload-report]')
    expect(await page.locator('[data-test=upload-report]').textContent()).toContain('initial_state')
    expect(await page.locator('[data-test=commit-append]').count()).toBe(0)
    await shot(page, 'deposit-upload-problems')

    // a clean file: check, then add
    await page.setInputFiles('[data-test=upload-input]', join(ROOT, 'tests/fixtures/deposit/good.csv'))
    await page.waitForSelector('[data-test=commit-append]')
    await page.click('[data-test=commit-append]')
    await page.waitForFunction(() => document.body.textContent!.includes('Records (3)'))

    // by hand: nothing in red before anything is typed; the rate comes from lifetimes and the form shows the formula
    expect(await page.locator('[data-test=form-status]').textContent()).toBe('Fill in the fields marked *.')
    expect(await page.locator('label[for=f-delta_g]').textContent()).toContain('Driving force ΔG°')
    await page.fill('#f-donor_name', 'ZnP')
    await page.fill('#f-acceptor_name', 'NDI')
    await page.fill('#f-solvent', 'toluene')
    await page.fill('#f-lifetime', '0.5')
    await page.fill('#f-reference_lifetime', '5')
    await page.fill('#f-delta_g', '-0.5')
    const derived = await page.locator('[data-test=derived]').textContent()
    expect(derived).toContain('k_ET = 1/τ − 1/τ_ref')
    expect(derived).toContain('1.8000e+9') // 1/0.5 ns − 1/5 ns (k = 1/τ − 1/τ_ref; worked-checks-mpmath.json)
    await shot(page, 'deposit-form')
    await page.click('[data-test=add-record]')
    await page.waitForFunction(() => document.body.textContent!.includes('Records (4)'))
    // the confirmation is where the person is, and the cursor is back on the first field
    await page.waitForFunction(() => document.querySelector('[data-test=form-status]')?.textContent?.includes('Record added'))
    expect(await page.evaluate(() => document.activeElement?.id)).toBe('f-donor_name')

    // editing goes through the same form, prefilled, and says which row it saved
    await page.getByRole('button', { name: 'Edit record 4', exact: true }).click()
    await page.waitForFunction(() => document.querySelector('#record-form h2')?.textContent?.includes('Edit record 4'))
    expect(await page.inputValue('#f-donor_name')).toBe('ZnP')
    expect(await page.inputValue('#f-solvent')).toBe('toluene')
    await page.fill('#f-temperature', '300')
    await page.click('[data-test=add-record]')
    await page.waitForFunction(() => document.body.textContent!.includes('Record 4 saved.'))
    const edited = await api(s.url, `/api/v1/datasets/${id}/versions/1`, { headers: { cookie: await signIn(s.url, DEMO.contributorA) } })
    const rec4 = edited.data.records.find((r: { position: number }) => r.position === 4)
    expect(rec4.data.temperatureK).toBe(300)
    expect(rec4.data.rate.value / 1.8e9).toBeCloseTo(1, 6) // still 1/0.5 ns − 1/5 ns

    // submitting asks first, naming what is sent
    let asked = ''
    page.once('dialog', (d) => {
      asked = d.message()
      void d.accept()
    })
    await page.click('[data-test=submit-review]')
    await page.waitForFunction(() => document.body.textContent!.includes('Submitted for review'))
    expect(asked).toMatch(/^Submit ".+" with \d+ records? for review\?/)
    await shot(page, 'deposit-submitted')
    const a = await signIn(s.url, DEMO.contributorA)
    const d = await api(s.url, `/api/v1/datasets/${id}/versions/1`, { headers: { cookie: a } })
    expect(d.data.version.state).toBe('submitted')
    expect(d.data.records).toHaveLength(4)
    expect(d.data.records[3].data.rate.method).toBe('lifetimes')
    expect(errors).toEqual([])
    await page.close()
  })
  it('the format page is generated from the schema and links the templates', async () => {
    const { page, errors } = await newPage(browser)
    await page.goto(`${s.url}/format`, { waitUntil: 'networkidle' })
    const text = await page.locator('main').textContent()
    for (const s2 of ['/rate/value', 'Unit: s⁻¹', 'rate (s-1)', 'charge-separation']) expect(text).toContain(s2)
    expect(await page.locator('a[href="/api/v1/templates/records.xlsx"]').count()).toBeGreaterThan(0)
    expect(errors).toEqual([])
    await page.close()
  })
  it('creators are entered as family and given names or as an organisation, and cited that way', async () => {
    const { page, errors } = await newPage(browser)
    await signInAs(page, s.url, DEMO.contributorA)
    await page.goto(`${s.url}/deposit`, { waitUntil: 'networkidle' })
    await page.fill('#new-title', 'Names (demo)')
    await page.click('[data-test=create-dataset]')
    await page.waitForURL(/\/deposit\/\d+$/)
    const id = Number(page.url().split('/').pop())
    // the account's one name is offered as stored, with a request to give its parts
    expect(await page.locator('[data-test=creator-1]').textContent()).toContain('give the family and given names')
    await page.getByLabel('Creator 1 family name').fill('García Márquez')
    await page.getByLabel('Creator 1 given names').fill('Gabriela')
    await page.getByRole('button', { name: '+ creator' }).click()
    await page.getByLabel('Creator 2: person or organisation').selectOption('organization')
    await page.getByLabel('Creator 2 organisation name').fill('Meridian Charge-Transfer Consortium (fictional)')
    await page.getByRole('button', { name: 'Save metadata' }).click()
    await page.waitForFunction(() => document.body.textContent!.includes('Saved.'))
    const cookie = (await page.context().cookies()).map(c => `${c.name}=${c.value}`).join('; ')
    const meta = (await api(s.url, `/api/v1/datasets/${id}`, { headers: { cookie } })).data.version.metadata
    expect(meta.creators).toEqual([
      expect.objectContaining({ name: 'García Márquez, Gabriela', nameType: 'Personal', familyName: 'García Márquez', givenName: 'Gabriela' }),
      expect.objectContaining({ name: 'Meridian Charge-Transfer Consortium (fictional)', nameType: 'Organizational' })
    ])
    await shot(page, 'deposit-creators')
    expect(errors).toEqual([])
    await page.close()
  })
})
