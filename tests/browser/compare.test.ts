import { readFileSync } from 'node:fs'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { startServer, type TestServer } from '../helpers/server'
import { launch, newPage, shot } from '../helpers/browser'

let s: TestServer
let browser: Browser
beforeAll(async () => { [s, browser] = await Promise.all([startServer({ seed: true }), launch()]) })
afterAll(async () => { await browser?.close(); await s?.stop() })

describe('compare', () => {
  it('builds a selection from search, fits it, exports a cited SVG, and a shared link reproduces the view', async () => {
    const { page, errors } = await newPage(browser)
    await page.goto(`${s.url}/explore?solvent=benzonitrile&pageSize=100`, { waitUntil: 'networkidle' })
    await page.click('[data-test=add-to-compare]')
    await page.waitForURL(/\/compare\?/)
    await page.waitForSelector('[data-test=rate-plot] svg circle')
    // the selection holds round-robin dyads: Compare points to their shared systems
    await page.waitForSelector('[data-test=compare-systems] a[href^="/systems/"]')
    const [resp] = await Promise.all([page.waitForResponse(r => r.url().endsWith('/api/v1/model/fit')), page.click('[data-test=compare-fit]')])
    const fit = await resp.json()
    await page.waitForSelector('[data-test=compare-fit-result]')
    expect(await page.locator('[data-test=cfit-lambdaSolvent]').textContent()).toBe(fit.parameters.lambdaSolvent.value.toPrecision(4))
    expect(await page.locator('[data-test=cfit-coupling]').textContent()).toBe(fit.parameters.coupling.value.toPrecision(4))
    // the fit the page asked for is the fit the API gives for the same points
    const again = await (await fetch(`${s.url}/api/v1/model/fit`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: resp.request().postData()! })).json() as any
    expect(again.parameters.lambdaSolvent.value).toBe(fit.parameters.lambdaSolvent.value)

    const [download] = await Promise.all([page.waitForEvent('download'), page.click('[data-test=export-svg]')])
    const svg = readFileSync((await download.path())!, 'utf8')
    const dois = [...new Set(((await page.locator('[data-test=caption]').textContent()) ?? '').match(/10\.99999\/[\w.-]+/g) ?? [])]
    expect(dois.length).toBeGreaterThan(0)
    for (const d of dois) expect(svg).toContain(d)
    expect(svg).toContain('<svg')
    // the exported figure is the plot itself (not a legend swatch), with legend and caption inside its viewBox
    const [, w, h] = svg.match(/^<svg[^>]*viewBox="0 0 ([\d.]+) ([\d.]+)"/)!.map(Number)
    expect(w).toBeGreaterThan(300)
    expect(svg).toMatch(new RegExp(`^<svg[^>]*width="${w}"[^>]*height="${h}"`))
    const shownDots = await page.locator('[data-test=rate-plot]').first().locator('g[data-mark=dot] circle').count()
    expect((svg.match(/<circle/g) ?? []).length).toBeGreaterThanOrEqual(shownDots)
    const view = await browser.newPage()
    await view.setContent(svg)
    const parts = await view.evaluate(() => {
      const box = (sel: string) => [...document.querySelectorAll(sel)].map((t) => {
        const b = (t as SVGGraphicsElement).getBBox()
        return { text: t.textContent ?? '', bottom: b.y + b.height, right: b.x + b.width }
      })
      return { legend: box('[data-part=legend] text'), caption: box('[data-part=caption] text') }
    })
    await view.close()
    expect(parts.legend.map(l => l.text)).toContain('semi-classical')
    for (const t of [...parts.legend, ...parts.caption]) {
      expect(t.bottom, t.text).toBeLessThanOrEqual(h)
      expect(t.right, t.text).toBeLessThanOrEqual(w)
    }
    const captionText = parts.caption.map(c => c.text).join(' ')
    for (const d of dois) expect(captionText).toContain(d)
    const [pngDownload] = await Promise.all([page.waitForEvent('download'), page.click('[data-test=export-png]')])
    const png = readFileSync((await pngDownload.path())!)
    expect(png.subarray(1, 4).toString()).toBe('PNG') // PNG signature and IHDR (ISO/IEC 15948 §5.2, §11.2.2)
    expect([png.readUInt32BE(16), png.readUInt32BE(20)]).toEqual([2 * Math.ceil(w), 2 * Math.ceil(h)])
    await shot(page, 'compare')

    const link = page.url()
    const caption = await page.locator('[data-test=caption]').textContent()
    const other = await browser.newContext()
    const p2 = await other.newPage()
    await p2.goto(link, { waitUntil: 'networkidle' })
    await p2.waitForSelector('[data-test=rate-plot] svg circle')
    expect(await p2.locator('[data-test=caption]').textContent()).toBe(caption)
    expect(await p2.locator('[data-test=rate-plot]').first().locator('svg circle').count()).toBe(await page.locator('[data-test=rate-plot]').first().locator('svg circle').count())
    await other.close()

    // own points stay in this browser across reloads, and a shared link does not carry them
    await page.fill('textarea[aria-label="Your points"]', '-0.85, 10.2, 0.1\n-1.1, 10.6')
    await page.getByRole('button', { name: 'Add points' }).click()
    await page.reload({ waitUntil: 'networkidle' })
    await page.waitForFunction(() => document.body.textContent!.includes('2 points of your own.'))
    expect(page.url()).not.toContain('10.2')
    expect(errors).toEqual([])
    await page.close()
  })
})
