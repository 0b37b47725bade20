/**
 * Hostile bodies against the built server: chunked 80 MB bodies (visitor and member), an XLSX that
 * expands to hundreds of MB, one with 120 000 rows, a CSV with one bad byte near its end, and 20 hostile
 * uploads at once. Throughout: no 5xx, /api/v1/health within 1 s, resident memory growing by < 300 MB.
 */
import { request } from 'node:http'
import { readFileSync } from 'node:fs'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Zip, ZipDeflate, zipSync, strToU8 } from 'fflate'
import { api, DEMO, signIn, startServer, type TestServer } from '../helpers/server'

let s: TestServer
let member: string
let draftId: number
let rssStart = 0
const rssMb = () => Number(readFileSync(`/proc/${s.proc.pid}/status`, 'utf8').match(/VmRSS:\s+(\d+)/)![1]) / 1024
const statuses: number[] = []
const healthMs: number[] = []
let watching = true

/** Sends `total` bytes with chunked transfer encoding (no Content-Length); resolves with the status, or 0 if the server cut the connection. */
function sendChunked (path: string, headers: Record<string, string>, total: number, head = '', tail = ''): Promise<number> {
  const url = new URL(s.url + path)
  return new Promise((resolve) => {
    let answered = 0
    const req = request({ host: url.hostname, port: url.port, path: url.pathname, method: 'POST', headers: { ...headers, 'transfer-encoding': 'chunked' } }, (res) => {
      answered = res.statusCode ?? 0; res.resume(); res.on('end', () => resolve(answered))
    })
    req.on('error', () => resolve(answered))
    const chunk = Buffer.alloc(1 << 20, 0x20)
    let sent = 0
    const pump = () => {
      if (head) { req.write(head); head = '' }
      while (sent < total && !answered) {
        sent += chunk.length
        if (!req.write(chunk)) { req.once('drain', pump); return }
      }
      req.end(tail)
    }
    pump()
  })
}

function multipart (name: string, data: Uint8Array, type = 'application/octet-stream') {
  const boundary = '----crosspoint-test-boundary'
  const head = Buffer.from(`--${boundary}\r\ncontent-disposition: form-data; name="file"; filename="${name}"\r\ncontent-type: ${type}\r\n\r\n`)
  const tail = Buffer.from(`\r\n--${boundary}--\r\n`)
  return { body: Buffer.concat([head, Buffer.from(data), tail]), type: `multipart/form-data; boundary=${boundary}` }
}
/** One upload on a connection of its own (no keep-alive reuse between the parallel requests). */
async function upload (name: string, data: Uint8Array) {
  const m = multipart(name, data)
  const url = new URL(`${s.url}/api/v1/datasets/${draftId}/uploads/check`)
  const { status, text } = await new Promise<{ status: number, text: string }>((resolve, reject) => {
    const req = request({ host: url.hostname, port: url.port, path: url.pathname, method: 'POST', agent: false, headers: { 'cookie': member, 'content-type': m.type, 'content-length': m.body.length } }, (res) => {
      let text = ''; res.setEncoding('utf8'); res.on('data', (c) => { text += c }); res.on('end', () => resolve({ status: res.statusCode ?? 0, text }))
    })
    req.on('error', reject)
    req.end(m.body)
  })
  statuses.push(status)
  let parsed: any = null
  try { parsed = JSON.parse(text) }
  catch { /* not JSON */ }
  return { status, data: parsed }
}

/** A workbook whose one sheet holds `rows` rows of three cells, deflated as it is made (never whole in memory). */
function workbook (rows: number, pad = 0): Uint8Array {
  const parts: Uint8Array[] = []
  const zip = new Zip((err, chunk) => { if (err) throw err; parts.push(chunk) })
  const add = (name: string, text: string) => { const f = new ZipDeflate(name, { level: 9 }); zip.add(f); f.push(strToU8(text), true) }
  add('[Content_Types].xml', '<?xml version="1.0" encoding="UTF-8"?><Types xmlns="http://schemas.openxmlformats.org/package/2006/content-types"><Default Extension="rels" ContentType="application/vnd.openxmlformats-package.relationships+xml"/><Default Extension="xml" ContentType="application/xml"/><Override PartName="/xl/workbook.xml" ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.sheet.main+xml"/><Override PartName="/xl/worksheets/sheet1.xml" ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.worksheet+xml"/></Types>')
  add('_rels/.rels', '<?xml version="1.0" encoding="UTF-8"?><Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships"><Relationship Id="rId1" Type="http://schemas.openxmlformats.org/officeDocument/2006/relationships/officeDocument" Target="xl/workbook.xml"/></Relationships>')
  add('xl/_rels/workbook.xml.rels', '<?xml version="1.0" encoding="UTF-8"?><Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships"><Relationship Id="rId1" Type="http://schemas.openxmlformats.org/officeDocument/2006/relationships/worksheet" Target="worksheets/sheet1.xml"/></Relationships>')
  add('xl/workbook.xml', '<?xml version="1.0" encoding="UTF-8"?><workbook xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main" xmlns:r="http://schemas.openxmlformats.org/officeDocument/2006/relationships"><sheets><sheet name="records" sheetId="1" r:id="rId1"/></sheets></workbook>')
  const sheet = new ZipDeflate('xl/worksheets/sheet1.xml', { level: 9 })
  zip.add(sheet)
  sheet.push(strToU8('<?xml version="1.0" encoding="UTF-8"?><worksheet xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main"><sheetData>'))
  const filler = pad ? `<!--${' '.repeat(pad)}-->` : ''
  let batch = ''
  for (let r = 1; r <= rows; r++) {
    batch += `<row r="${r}"><c r="A${r}" t="inlineStr"><is><t>donor_name</t></is></c><c r="B${r}"><v>${r}</v></c><c r="C${r}"><v>1</v></c></row>${filler}`
    if (batch.length > 1 << 20) { sheet.push(strToU8(batch)); batch = '' }
  }
  sheet.push(strToU8(batch + '</sheetData></worksheet>'), true)
  zip.end()
  return Buffer.concat(parts)
}

/** Hostile workbooks, made before the health watcher starts (making them blocks this process for seconds). */
const book: Record<string, Uint8Array> = {}
beforeAll(async () => {
  book.bomb = workbook(2000, 150_000) // ≈ 300 MB of XML, a few hundred kB zipped
  book.bomb2 = workbook(1000, 300_000)
  book.rows120k = workbook(120_000)
  book.rows110k = workbook(110_000)
  s = await startServer({ seed: true })
  member = await signIn(s.url, DEMO.contributorA)
  const me = (await api(s.url, '/api/v1/me', { headers: { cookie: member } })).data.user
  draftId = (await api(s.url, '/api/v1/datasets', { method: 'POST', headers: { cookie: member }, json: { labId: me.labIds[0], title: 'Abuse' } })).data.id
  await api(s.url, '/api/v1/health')
  rssStart = rssMb()
  // health watcher: the whole suite long, one probe every 250 ms
  void (async () => {
    while (watching) {
      const t = performance.now()
      // a fresh connection per probe: it measures the server's answer, not a keep-alive race in the client pool
      const ok = await new Promise<boolean>((resolve) => {
        const url = new URL(`${s.url}/api/v1/health`)
        const req = request({ host: url.hostname, port: url.port, path: url.pathname, agent: false }, (res) => { res.resume(); res.on('end', () => resolve(res.statusCode === 200)) })
        req.on('error', () => resolve(false)); req.end()
      })
      healthMs.push(ok ? performance.now() - t : Infinity)
      await new Promise(res => setTimeout(res, 250))
    }
  })()
}, 120_000)
afterAll(async () => { watching = false; if (process.env.SHOW_SERVER) console.log('SERVER', s.output().slice(-4000)); await s?.stop() })

describe('bodies bounded while they arrive', () => {
  it('80 MB of chunked JSON from a visitor to /model/fit: 413 without buffering it', async () => {
    const st = await sendChunked('/api/v1/model/fit', { 'content-type': 'application/json' }, 80 << 20, '{"model":"classical","points":"')
    statuses.push(st)
    expect([413, 0]).toContain(st)
    expect(rssMb() - rssStart).toBeLessThan(100)
  })
  it('four of them in parallel', async () => {
    const sts = await Promise.all([0, 1, 2, 3].map(() => sendChunked('/api/v1/model/curve', { 'content-type': 'application/json' }, 80 << 20, '[')))
    statuses.push(...sts)
    for (const st of sts) expect([413, 0]).toContain(st)
    expect(rssMb() - rssStart).toBeLessThan(150)
  })
  it('80 MB of chunked multipart from a lab member to the upload route: 413', async () => {
    const boundary = 'xx-boundary'
    const st = await sendChunked(`/api/v1/datasets/${draftId}/uploads/check`, { 'content-type': `multipart/form-data; boundary=${boundary}`, 'cookie': member }, 80 << 20,
      `--${boundary}\r\ncontent-disposition: form-data; name="file"; filename="big.csv"\r\ncontent-type: text/csv\r\n\r\n`)
    statuses.push(st)
    expect([413, 0]).toContain(st)
  })
  it('a form-encoded or multipart body to a JSON route is 415 (the API takes JSON)', async () => {
    const form = await fetch(`${s.url}/api/v1/model/curve`, { method: 'POST', body: 'model=classical', headers: { 'content-type': 'application/x-www-form-urlencoded' } })
    expect(form.status).toBe(415)
    const mp = await fetch(`${s.url}/api/v1/datasets`, { method: 'POST', body: new FormData(), headers: { cookie: member } })
    expect(mp.status).toBe(415)
  })
})

describe('parsers that stay linear and bounded', () => {
  it('one bad byte near the end of a 400 kB CSV: 422 naming the line, in well under a second of server work', async () => {
    const good = readFileSync(new URL('../fixtures/deposit/good.csv', import.meta.url), 'utf8').split('\r\n')
    const lines = [good[0]!]
    while (lines.join('\r\n').length < 400_000) lines.push(good[1]!)
    const bytes = Buffer.concat([Buffer.from(lines.join('\r\n') + '\r\n'), Buffer.from([0xC3, 0x28]), Buffer.from(',x\r\n')])
    const t = performance.now()
    const r = await upload('bad-byte.csv', bytes)
    const ms = performance.now() - t
    expect(r.status).toBe(422)
    expect(r.data.data.issues[0]).toMatchObject({ row: lines.length + 1, path: '/file', message: 'not UTF-8' })
    expect(r.data.message).toMatch(/first bad byte at byte \d+, line \d+/)
    expect(ms).toBeLessThan(5000) // was 61 s: each prefix decoded again
  })
  it('an XLSX that expands past 256 MB of XML is 413 without being read whole', async () => {
    const bomb = book.bomb!
    expect(bomb.length).toBeLessThan(2 << 20)
    const r = await upload('bomb.xlsx', bomb)
    expect(r.status).toBe(413)
    expect(r.data.message).toMatch(/expands to more than 256 MB/)
    expect(rssMb() - rssStart).toBeLessThan(250)
  })
  it('an XLSX of 120 000 rows is 413 at the row cap', async () => {
    const r = await upload('rows.xlsx', book.rows120k!)
    expect(r.status).toBe(413)
    expect(r.data.message).toMatch(/Too many rows/)
  })
  it('20 hostile uploads at once: each refused or answered, none a 5xx', async () => {
    const files = [
      ['bomb.xlsx', book.bomb2!], ['rows.xlsx', book.rows110k!], ['latin1.csv', Buffer.from([0x61, 0x0A, 0xE9, 0x0A])],
      ['zip.xlsx', zipSync({ 'a.txt': new Uint8Array(10) })], ['garbage.xlsx', Buffer.from('PK not really')]
    ] as const
    const rs = await Promise.all(Array.from({ length: 20 }, (_, i) => upload(files[i % files.length]![0], files[i % files.length]![1])))
    for (const r of rs) expect([413, 415, 422, 429]).toContain(r.status)
    expect(rs.some(r => r.status === 429)).toBe(true) // at most four are read at once
  })
})

describe('after the abuse', () => {
  it('no 5xx anywhere, health answered within 1 s throughout, memory grew by under 300 MB', async () => {
    console.log(JSON.stringify({ abuse: { requests: statuses.length, healthProbes: healthMs.length, healthMaxMs: Math.round(Math.max(...healthMs)), rssGrowthMb: Math.round(rssMb() - rssStart) } }))
    for (const st of statuses) expect(st).toBeLessThan(500)
    expect(healthMs.length).toBeGreaterThan(4)
    expect(Math.max(...healthMs)).toBeLessThan(1000)
    expect(rssMb() - rssStart).toBeLessThan(300)
    expect((await api(s.url, '/api/v1/health')).status).toBe(200)
  })
})
