/**
 * Online backups and restores. A backup is a dated folder holding a consistent copy of the
 * database (SQLite's VACUUM INTO, safe while writes go on), every stored upload, a SHA256SUMS file
 * and backup.json. A restore verifies all of it, and the copy's integrity, before it replaces anything.
 */
import { createHash } from 'node:crypto'
import { copyFile, mkdir, readdir, readFile, rename, rm, stat, writeFile } from 'node:fs/promises'
import { basename, dirname, isAbsolute, join, relative, resolve } from 'node:path'
import { createClient } from '@libsql/client'
import { assertIntact } from './db'
import { KEY_PATTERN, LocalStore, type FileStore } from './files'

export function resolveFileUrl (url: string): string {
  if (!url.startsWith('file:'))
    throw new Error('Backups cover the embedded SQLite file; a libSQL server is backed up by its own tooling')
  const raw = url.slice(5)
  return isAbsolute(raw) ? raw : resolve(process.cwd(), raw)
}

async function sha256File (path: string): Promise<string> {
  return createHash('sha256')
    .update(await readFile(path))
    .digest('hex')
}

async function listFiles (dir: string): Promise<string[]> {
  const out: string[] = []
  const walk = async (d: string) => {
    for (const e of await readdir(d, { withFileTypes: true }).catch(() => [])) {
      const p = join(d, e.name)
      if (e.isDirectory()) await walk(p)
      else if (e.isFile()) out.push(p)
    }
  }
  await walk(dir)
  return out
}

export interface BackupResult {
  folder: string
  files: number
  bytes: number
  records: number
  publishedVersions: number
}

/** Backs up the database and the stored files of `store` (default: the local folder dataDir). */
export async function backup (opts: { databaseUrl: string, dataDir: string, backupDir: string, store?: FileStore }): Promise<BackupResult> {
  const stamp = new Date().toISOString().replace(/[:.]/g, '-')
  const folder = join(resolve(opts.backupDir), `crosspoint-${stamp}`)
  await mkdir(join(folder, 'files'), { recursive: true })
  const db = createClient({ url: `file:${resolveFileUrl(opts.databaseUrl)}` })
  try {
    await db.execute({ sql: 'VACUUM INTO ?', args: [join(folder, 'crosspoint.db')] })
    // counted in the copy, not the live database (which may have moved on since)
    const copy = createClient({ url: `file:${join(folder, 'crosspoint.db')}` })
    let records: number
    let publishedVersions: number
    try {
      records = Number((await copy.execute('select count(*) n from rate_record')).rows[0]!.n)
      publishedVersions = Number(
        (await copy.execute('select count(*) n from dataset_version where state = \'published\'')).rows[0]!.n
      )
    }
    finally {
      copy.close()
    }
    const store = opts.store ?? new LocalStore(resolve(opts.dataDir))
    for await (const f of store.list('uploads/')) {
      if (!KEY_PATTERN.test(f.key)) continue
      const data = await store.get(f.key)
      if (!data) continue
      const dest = join(folder, 'files', f.key)
      await mkdir(dirname(dest), { recursive: true })
      await writeFile(dest, data)
    }
    const all = (await listFiles(folder)).filter(f => !f.endsWith('SHA256SUMS'))
    const lines: string[] = []
    let bytes = 0
    for (const f of all.sort()) {
      lines.push(`${await sha256File(f)}  ${relative(folder, f)}`)
      bytes += (await stat(f)).size
    }
    await writeFile(
      join(folder, 'backup.json'),
      JSON.stringify({ createdAt: new Date().toISOString(), records, publishedVersions, files: all.length }, null, 2)
    )
    lines.push(`${await sha256File(join(folder, 'backup.json'))}  backup.json`)
    await writeFile(join(folder, 'SHA256SUMS'), lines.join('\n') + '\n')
    return { folder, files: all.length + 1, bytes, records, publishedVersions }
  }
  finally {
    db.close()
  }
}

/** Checks every checksum and the copied database's integrity; throws with the first problem. */
export async function verifyBackup (folder: string): Promise<void> {
  const sums = await readFile(join(folder, 'SHA256SUMS'), 'utf8').catch(() => {
    throw new Error(`${folder} has no SHA256SUMS: not a Crosspoint backup`)
  })
  for (const line of sums.trim().split('\n')) {
    const [hash, path] = line.split(/\s+/)
    const p = join(folder, path!)
    if (relative(folder, p).startsWith('..')) throw new Error(`SHA256SUMS names a path outside the backup: ${path}`)
    const actual = await sha256File(p).catch(() => 'missing')
    if (actual !== hash)
      throw new Error(
        `Checksum mismatch for ${path} (${actual === 'missing' ? 'file missing' : 'content changed'}); this backup cannot be trusted`
      )
  }
  const db = createClient({ url: `file:${join(folder, 'crosspoint.db')}` })
  try {
    await assertIntact(db, join(folder, 'crosspoint.db'))
  }
  finally {
    db.close()
  }
}

// ── servers using a database file ─────────────────────────────────────────────────────────
/** A running server marks the database it uses with `<file>.server-<pid>` (removed when it exits). */
export function serverMarkPath (dbPath: string): string {
  return `${dbPath}.server-${process.pid}`
}

/** Process ids of live servers that have marked this database (stale marks of dead processes are removed). */
export async function liveServers (dbPath: string): Promise<number[]> {
  const dir = dirname(dbPath)
  const prefix = `${basename(dbPath)}.server-`
  const live: number[] = []
  for (const name of await readdir(dir).catch(() => [] as string[])) {
    if (!name.startsWith(prefix)) continue
    const pid = Number(name.slice(prefix.length))
    if (!Number.isInteger(pid) || pid <= 0) continue
    let alive = true
    try {
      process.kill(pid, 0)
    }
    catch (e) {
      alive = (e as NodeJS.ErrnoException).code === 'EPERM'
    }
    if (alive) live.push(pid)
    else await rm(join(dir, name), { force: true })
  }
  return live
}

/**
 * Verifies, then swaps the backup in. Refused while a server uses the database (its next writes would be
 * lost). The current database is checkpointed first (its WAL folded in) and kept beside, with any -wal
 * and -shm files, so nothing committed is lost.
 */
export async function restore (opts: {
  folder: string
  databaseUrl: string
  dataDir: string
  /** where the files go back to (default: the local folder dataDir) */
  store?: FileStore
}): Promise<{ kept: string }> {
  await verifyBackup(opts.folder)
  const target = resolveFileUrl(opts.databaseUrl)
  const servers = await liveServers(target)
  if (servers.length)
    throw new Error(`a Crosspoint server (process ${servers.join(', ')}) is using ${target}; stop it, then restore`)
  const kept = `${target}.before-restore-${Date.now()}`
  await mkdir(dirname(target), { recursive: true })
  if (
    await stat(target).then(
      () => true,
      () => false
    )
  ) {
    const db = createClient({ url: `file:${target}` })
    try {
      await db.execute('PRAGMA wal_checkpoint(TRUNCATE)')
    }
    catch {
      /* not a WAL database, or damaged: kept as it is */
    }
    finally {
      db.close()
    }
    await rename(target, kept)
  }
  for (const ext of ['-wal', '-shm']) await rename(target + ext, kept + ext).catch(() => {})
  await copyFile(join(opts.folder, 'crosspoint.db'), target)
  const store = opts.store ?? new LocalStore(resolve(opts.dataDir))
  const files = join(opts.folder, 'files')
  for (const f of await listFiles(join(files, 'uploads'))) await store.put(relative(files, f).split('\\').join('/'), await readFile(f))
  return { kept }
}
