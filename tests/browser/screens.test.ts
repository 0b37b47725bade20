/**
 * Every page of the demo, signed out and signed in as each role, at desktop width and on a 390 px phone:
 * axe-core (WCAG 2.0/2.1/2.2 A and AA rules) finds no serious or critical violation, no page is wider than
 * the phone's viewport, and no page shows a programmer's identifier (camelCase) or a "(s)" plural.
 */
import { readFileSync } from 'node:fs'
import { createRequire } from 'node:module'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { api, DEMO, signIn, startServer, type TestServer } from '../helpers/server'
import { launch, shot, signInAs } from '../helpers/browser'

const AXE = readFileSync(createRequire(import.meta.url).resolve('axe-core/axe.min.js'), 'utf8')
// written with a capital after small letters on purpose: SI unit symbols, pH, chemical abbreviations such as
// tBu (tert-butyl, IUPAC Blue Book P-29.6), and the "iD" of ORCID iD (ORCID's own spelling)
const ALLOWED_MIXED_CASE = new Set(['eV', 'meV', 'kJ', 'mPa', 'mV', 'pH', 'kDa', 'nA', 'mL', 'tBu', 'iPr', 'iD'])

let s: TestServer
let browser: Browser
const pages: { who: keyof typeof DEMO | 'visitor', path: string }[] = []
beforeAll(async () => {
  [s, browser] = await Promise.all([startServer({ seed: true }), launch()])
  const lead = await signIn(s.url, DEMO.contributorA)
  const drafts = await api(s.url, '/api/v1/datasets?state=draft', { headers: { cookie: lead } })
  const draft = (drafts.data.items as { id: number, state: string }[]).find(d => d.state === 'draft')
  const cur = await signIn(s.url, DEMO.curator)
  const queue = await api(s.url, '/api/v1/review/queue', { headers: { cookie: cur } })
  const sub = (queue.data.items as { datasetId: number }[])[0]
  pages.push(
    ...['/', '/explore', '/explore?q=porphyrin', '/datasets', '/datasets/2', '/records/200', '/model', '/compare', '/format',
      '/signin', '/signup'].map(path => ({ who: 'visitor' as const, path })),
    { who: 'contributorA', path: '/deposit' },
    ...(draft ? [{ who: 'contributorA' as const, path: `/deposit/${draft.id}` }] : []),
    { who: 'contributorA', path: '/account' },
    { who: 'curator', path: '/review' },
    ...(sub ? [{ who: 'curator' as const, path: `/review/${sub.datasetId}` }] : []),
    ...['users', 'labs', 'solvents', 'outbox', 'audit', 'usage'].map(t => ({ who: 'admin' as const, path: `/admin?tab=${t}` }))
  )
})
afterAll(async () => { await browser?.close(); await s?.stop() })

async function pageAs (who: keyof typeof DEMO | 'visitor', width: number): Promise<Page> {
  const ctx = await browser.newContext({ viewport: { width, height: 900 } })
  const page = await ctx.newPage()
  if (who !== 'visitor') await signInAs(page, s.url, DEMO[who])
  return page
}

async function axeViolations (page: Page) {
  await page.evaluate(AXE)
  return page.evaluate(async () => {
    const r = await (window as unknown as { axe: { run: (c: unknown, o: unknown) => Promise<{ violations: {
      id: string, impact: string, help: string, nodes: { target: string[] }[] }[] }> } })
      .axe.run(document, { runOnly: { type: 'tag', values: ['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa', 'wcag22aa'] } })
    return r.violations
      .filter(v => v.impact === 'serious' || v.impact === 'critical')
      .map(v => `${v.id} (${v.impact}): ${v.help} — ${v.nodes.slice(0, 3).map(n => n.target.join(' ')).join(', ')}`)
  })
}

describe('every page, every role', () => {
  it('has no serious or critical WCAG violation (axe-core) and no camelCase or "(s)" in its text, at desktop width', async () => {
    const found: string[] = []
    for (const p of pages) {
      const page = await pageAs(p.who, 1360)
      await page.goto(`${s.url}${p.path}`, { waitUntil: 'networkidle' })
      for (const v of await axeViolations(page)) found.push(`${p.who} ${p.path}: ${v}`)
      // code and preformatted text (the format page's field names, JSON examples) are meant to be exact
      const text = await page.evaluate(() => {
        const body = document.body.cloneNode(true) as HTMLElement
        body.querySelectorAll('code, pre, kbd, samp').forEach(e => e.remove())
        document.documentElement.appendChild(body)
        const t = body.innerText
        body.remove()
        return t
      })
      const camel = [...new Set(text.match(/\b[a-z]+[A-Z][A-Za-z]*\b/g) ?? [])].filter(w => !ALLOWED_MIXED_CASE.has(w))
      if (camel.length) found.push(`${p.who} ${p.path}: identifiers in the text: ${camel.join(', ')}`)
      const plural = text.match(/.{0,20}\w\(s\).{0,10}/g)
      if (plural) found.push(`${p.who} ${p.path}: "(s)" plurals: ${plural.join(' | ')}`)
      await page.context().close()
    }
    expect(found).toEqual([])
  })
  it('fits a 390 px phone screen: no page is wider than the viewport', async () => {
    const wide: string[] = []
    for (const p of pages) {
      const page = await pageAs(p.who, 390)
      await page.goto(`${s.url}${p.path}`, { waitUntil: 'networkidle' })
      const w = await page.evaluate(() => document.documentElement.scrollWidth)
      if (w > 390) {
        wide.push(`${p.who} ${p.path}: ${w} px`)
        await shot(page, `phone-${p.who}-${p.path.replace(/[^a-z0-9]+/gi, '_')}`)
      }
      await page.context().close()
    }
    expect(wide).toEqual([])
  })
})
