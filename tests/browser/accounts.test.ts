import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { DEMO, startServer, type TestServer } from '../helpers/server'
import { launch, newPage, shot, signInAs } from '../helpers/browser'

let s: TestServer
let browser: Browser
beforeAll(async () => { [s, browser] = await Promise.all([startServer({ seed: true }), launch()]) })
afterAll(async () => { await browser?.close(); await s?.stop() })

describe('a new person signs up', () => {
  it('signs up, confirms through the mail in the outbox, signs in and sees only what a contributor may', async () => {
    const { page, errors } = await newPage(browser)
    await page.goto(`${s.url}/signup`)
    await page.fill('#name', 'Browser Person')
    await page.fill('#email', 'browser.person@example.org')
    await page.fill('#password', 'browser-person-password')
    await page.click('button[type=submit]')
    await page.waitForSelector('[data-test=signup-done]')
    await shot(page, 'signup-done')

    // The admin reads the mail in the app's outbox.
    const adminCtx = await browser.newContext()
    const adminPage = await adminCtx.newPage()
    await signInAs(adminPage, s.url, DEMO.admin)
    // The mail is written after the neutral-timed answer (server/utils/accounts/accounts.ts): reload until it is listed.
    for (let i = 0; i < 30; i++) {
      await adminPage.goto(`${s.url}/admin?tab=outbox`, { waitUntil: 'networkidle' })
      if (await adminPage.getByText('Confirm your e-mail address for Crosspoint').count()) break
      await adminPage.waitForTimeout(300)
    }
    await adminPage.getByText('Confirm your e-mail address for Crosspoint').first().click()
    const body = await adminPage.locator('[data-test=mail-body]').textContent()
    await shot(adminPage, 'admin-outbox')
    const link = body!.match(/https?:\/\/\S+/)![0]
    await adminCtx.close()

    await page.goto(link)
    await page.waitForSelector('[data-test=verified]')
    await page.goto(`${s.url}/signin`)
    await page.fill('#email', 'browser.person@example.org')
    await page.fill('#password', 'browser-person-password')
    await page.click('button[type=submit]')
    await page.waitForURL(u => !u.pathname.startsWith('/signin'))
    expect(await page.locator('[data-test=whoami]').textContent()).toContain('Browser Person')
    const nav = await page.locator('nav[aria-label=Main]').textContent()
    expect(nav).not.toContain('Administration')
    await page.goto(`${s.url}/admin`, { waitUntil: 'networkidle' })
    expect(await page.locator('[role=alert]').textContent()).toContain('Only admins can use this page.')
    await page.goto(`${s.url}/account`, { waitUntil: 'networkidle' })
    await page.fill('#p-orcid', '0000-0002-1825-0098')
    expect(await page.locator('[data-test=orcid-problem]').isVisible()).toBe(true)
    await page.fill('#p-orcid', '0000-0002-1825-0097')
    expect(await page.locator('[data-test=orcid-problem]').count()).toBe(0)
    await shot(page, 'account')
    // the only console errors allowed are the admin API's expected refusals on /admin
    expect(errors.filter(e => !/status of 40[13]/.test(e))).toEqual([])
    await page.close()
  })
})
