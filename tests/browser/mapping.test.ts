/**
 * The mapping step in the browser: a contributor uploads a sheet with the lab's own headers (semicolons, decimal
 * commas), confirms the proposed columns, sets the fields the sheet leaves out once for the file, saves the mapping
 * and adds the records; a second file with the same headers is then read with the saved mapping without a click.
 */
import { mkdtempSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { api, DEMO, signIn, startServer, type TestServer } from '../helpers/server'
import { launch, newPage, shot, signInAs } from '../helpers/browser'

const dir = mkdtempSync(join(tmpdir(), 'crosspoint-map-'))
const first = join(dir, 'flash-march.csv')
const second = join(dir, 'flash-april.csv')
writeFileSync(first, 'Donor;Acceptor;T / K;k_ET / s^-1;dG / eV\nZnP;C60;298,15;1,2e9;-0,74\nZnP;C70;298,15;3,4e8;-0,52\n')
writeFileSync(second, 'Donor;Acceptor;T / K;k_ET / s^-1;dG / eV\nH2P;C60;295;7,5e8;-0,61\n')

let s: TestServer
let browser: Browser
let id = 0
beforeAll(async () => {
  [s, browser] = await Promise.all([startServer({ seed: true }), launch()])
  const a = await signIn(s.url, DEMO.contributorA)
  const labA = (await api(s.url, '/api/v1/me', { headers: { cookie: a } })).data.user.labIds[0]
  id = (await api(s.url, '/api/v1/datasets', { method: 'POST', headers: { cookie: a }, json: { labId: labA, title: 'Our own spreadsheets (browser test)' } })).data.id
}, 90_000)
afterAll(async () => { await browser?.close(); await s?.stop() })

describe('mapping a spreadsheet of the lab\'s own', () => {
  it('maps by hand and saves; the next file with the same headers needs no click', async () => {
    const { page, errors } = await newPage(browser)
    await signInAs(page, s.url, DEMO.contributorA)
    await page.goto(`${s.url}/deposit/${id}`, { waitUntil: 'networkidle' })
    await page.setInputFiles('[data-test=upload-input]', first)
    const step = page.locator('[data-test=mapping-step]')
    await step.locator('[data-test=mapping-columns]').waitFor()
    // the proposal: each header read as its field, with the unit from the header
    expect(await step.getByLabel('Field for T / K').inputValue()).toBe('temperature')
    expect(await step.getByLabel('Unit for k_ET / s^-1').inputValue()).toBe('s-1')
    expect(await page.locator('#map-decimal').inputValue()).toBe(',')
    // what the sheet does not say, once for the file
    await page.selectOption('#map-const-linkage', 'covalent')
    await page.selectOption('#map-const-process', 'charge-separation')
    await page.selectOption('#map-const-initial_state', 'singlet')
    await page.selectOption('#map-const-technique', 'transient-absorption')
    await page.fill('#map-const-solvent', 'benzonitrile')
    await page.locator('#map-const-solvent').press('Tab')
    await expect.poll(async () => await step.locator('[data-test=mapping-preview]').textContent(), { timeout: 10_000 }).toContain('benzonitrile')
    expect(await step.locator('[data-test=mapping-preview]').textContent()).toContain('298.15')
    await page.fill('#map-save', 'Flash photolysis export')
    await shot(page, 'mapping-step')
    await step.getByRole('button', { name: 'Check the file read this way' }).click()
    await page.locator('[data-test=upload-report]').waitFor()
    expect(await page.locator('[data-test=upload-report]').textContent()).toMatch(/2\s*rows read,\s*2\s*ready/)
    await page.getByRole('button', { name: 'Add 2 records' }).click()
    await page.getByText('2 records added.').waitFor()
    // the second file: read with the saved mapping, straight to the report
    await page.setInputFiles('[data-test=upload-input]', second)
    await page.locator('[data-test=upload-report]').waitFor()
    expect(await page.locator('[data-test=mapping-step]').textContent()).toContain('Read with your lab\'s mapping “Flash photolysis export”')
    expect(await page.locator('[data-test=upload-report]').textContent()).toMatch(/1\s*rows read,\s*1\s*ready/)
    await page.getByRole('button', { name: 'Add 1 record' }).click()
    await page.getByText('1 records added.').or(page.getByText('1 record added.')).waitFor()
    const a = await signIn(s.url, DEMO.contributorA)
    const recs = (await api(s.url, `/api/v1/datasets/${id}/versions/1`, { headers: { cookie: a } })).data.records
    expect(recs.map((r: any) => [r.data.system.donor.name, r.data.medium.solvent, r.data.temperatureK, r.data.rate.value, r.data.drivingForce.value]))
      .toEqual([['ZnP', 'benzonitrile', 298.15, 1.2e9, -0.74], ['ZnP', 'benzonitrile', 298.15, 3.4e8, -0.52], ['H2P', 'benzonitrile', 295, 7.5e8, -0.61]])
    // the only failed requests: each file's first check without a mapping (422 with the proposal), as designed
    expect(errors.filter(e => !e.includes('status of 422'))).toEqual([])
    expect(errors.filter(e => e.includes('status of 422'))).toHaveLength(2)
  })
})
