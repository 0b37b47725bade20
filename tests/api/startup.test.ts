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
      env: { ...process.env, PORT: String(port), HOST: '127.0.0.1', NUXT_DATABASE_URL: `file:${join(dir, 'file', 'db.sqlite')}`, AUTH_ORIGIN: `http://127.0.0.1:${port}/api/auth` }
    })
    let out = ''
    proc.stdout.on('data', d => { out += d }); proc.stderr.on('data', d => { out += d })
    const code = await new Promise<number | null>(r => proc.on('exit', r))
    rmSync(dir, { recursive: true, force: true })
    expect(code).toBe(1)
    expect(out).toContain('[crosspoint] start-up failed: Crosspoint cannot use the database file')
    expect(out).toContain('make its folder exist and be writable, or set NUXT_DATABASE_URL')
  })
})
