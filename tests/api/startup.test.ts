import { spawn } from 'node:child_process'
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { describe, expect, it } from 'vitest'
import { SERVER_ENTRY, freePort } from '../helpers/server'

describe('start-up', () => {
  it('a database path that cannot be created stops the server with a clear message', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'crosspoint-start-'))
    writeFileSync(join(dir, 'file'), 'x')
    const port = await freePort()
    const proc = spawn(process.execPath, [SERVER_ENTRY], {
      cwd: dir,
      env: { ...process.env, PORT: String(port), HOST: '127.0.0.1', NUXT_DATABASE_URL: `file:${join(dir, 'file', 'db.sqlite')}`, AUTH_ORIGIN: `http://127.0.0.1:${port}/api/auth`, NUXT_AUTH_SECRET: 'startup-test-secret' }
    })
    let out = ''
    proc.stdout.on('data', (d) => { out += d }); proc.stderr.on('data', (d) => { out += d })
    const code = await new Promise<number | null>(r => proc.on('exit', r))
    rmSync(dir, { recursive: true, force: true })
    expect(code).toBe(1)
    expect(out).toContain('[crosspoint] start-up failed: Crosspoint cannot use the database file')
    expect(out).toContain('make its folder exist and be writable, or set NUXT_DATABASE_URL')
  })
  it.each([
    ['without NUXT_AUTH_SECRET', {}],
    ['with the demo secret', { NUXT_AUTH_SECRET: 'crosspoint-demo-secret-change-me-in-production' }]
  ])('a production server refuses to start %s (a forged session would be accepted as admin)', async (_n, extra) => {
    const dir = mkdtempSync(join(tmpdir(), 'crosspoint-start-'))
    const port = await freePort()
    const env: Record<string, string | undefined> = { ...process.env, PORT: String(port), HOST: '127.0.0.1', NUXT_DATABASE_URL: `file:${join(dir, 'db.sqlite')}`, AUTH_ORIGIN: `http://127.0.0.1:${port}/api/auth`, ...extra }
    delete env.CROSSPOINT_DEMO
    if (!('NUXT_AUTH_SECRET' in extra)) delete env.NUXT_AUTH_SECRET
    const proc = spawn(process.execPath, [SERVER_ENTRY], { cwd: dir, env })
    let out = ''
    proc.stdout.on('data', (d) => { out += d }); proc.stderr.on('data', (d) => { out += d })
    const code = await new Promise<number | null>(r => proc.on('exit', r))
    rmSync(dir, { recursive: true, force: true })
    expect(code).toBe(1)
    expect(out).toContain('[crosspoint] start-up refused: NUXT_AUTH_SECRET is not set (or is the demo value')
  })
})
