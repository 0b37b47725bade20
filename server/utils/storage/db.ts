/**
 * One lazily created Drizzle/libSQL client per process. The first use applies pending migrations;
 * every caller awaits the same promise (Nitro does not await async plugins).
 */
import { accessSync, constants, existsSync, mkdirSync } from 'node:fs'
import { dirname, isAbsolute, resolve } from 'node:path'
import { fileURLToPath } from 'node:url'
import { createClient, type Client } from '@libsql/client'
import { drizzle, type LibSQLDatabase } from 'drizzle-orm/libsql'
import { migrate } from 'drizzle-orm/libsql/migrator'
import * as schema from '../../database/schema'

export type Db = LibSQLDatabase<typeof schema>
/** The handle a transaction callback receives (one name for it everywhere). */
export type Tx = Parameters<Parameters<Db['transaction']>[0]>[0]
export { schema }

let ready: Promise<{ db: Db, client: Client }> | undefined

/** Where the drizzle-kit migrations are: an explicit override, the project folder, or beside the built server. */
export function findMigrationsFolder (): string {
  const candidates = [
    process.env.NUXT_MIGRATIONS_DIR,
    resolve(process.cwd(), 'drizzle'),
    process.argv[1] ? resolve(dirname(process.argv[1]), 'drizzle') : undefined
  ]
  // Walk up from this module (inside .output/server/chunks/… once built).
  let dir = dirname(fileURLToPath(import.meta.url))
  for (let i = 0; i < 6; i++) {
    candidates.push(resolve(dir, 'drizzle'))
    dir = dirname(dir)
  }
  for (const c of candidates) if (c && existsSync(resolve(c, 'meta/_journal.json'))) return c
  throw new Error(
    'Crosspoint cannot find its database migrations (drizzle/meta/_journal.json); set NUXT_MIGRATIONS_DIR'
  )
}

/** For a file: URL, make sure the folder exists and is writable, with a message that says what to fix. */
function prepareFileDatabase (url: string): string {
  if (!url.startsWith('file:')) return url
  const raw = url.slice('file:'.length)
  const path = isAbsolute(raw) ? raw : resolve(process.cwd(), raw)
  const folder = dirname(path)
  try {
    mkdirSync(folder, { recursive: true })
    accessSync(folder, constants.W_OK)
    if (existsSync(path)) accessSync(path, constants.W_OK | constants.R_OK)
  }
  catch (e) {
    const code = (e as NodeJS.ErrnoException).code ?? 'error'
    throw new Error(
      `Crosspoint cannot use the database file ${path} (${code}): make its folder exist and be writable, or set NUXT_DATABASE_URL`,
      { cause: e }
    )
  }
  return `file:${path}`
}

/** Refuses a damaged database file rather than serving (and writing to) it. */
export async function assertIntact (client: Client, url: string): Promise<void> {
  let verdict: string
  try {
    const rows = (await client.execute('PRAGMA integrity_check')).rows
    verdict = rows.map(r => String(Object.values(r)[0])).join('; ')
  }
  catch (e) {
    verdict = (e as Error).message
  }
  if (verdict !== 'ok') {
    client.close()
    throw new Error(
      `The database ${url} is damaged (integrity check: ${verdict.slice(0, 300)}). Crosspoint will not serve it; `
      + `restore the newest backup with npm run restore`
    )
  }
}

export async function openDatabase (url: string, authToken?: string): Promise<{ db: Db, client: Client }> {
  // timeout: every pooled connection (transactions get their own) waits up to 5 s for a lock
  // instead of failing at once with SQLITE_BUSY; the PRAGMA below only reaches the first one.
  const client = createClient({ url: prepareFileDatabase(url), authToken: authToken || undefined, timeout: 5000 })
  if (url.startsWith('file:')) {
    await client.execute('PRAGMA journal_mode = WAL')
    await client.execute('PRAGMA busy_timeout = 5000')
  }
  await client.execute('PRAGMA foreign_keys = ON')
  if (url.startsWith('file:')) await assertIntact(client, url)
  const db = drizzle(client, { schema })
  await migrate(db, { migrationsFolder: findMigrationsFolder() })
  return { db, client }
}

function databaseConfig (): { url: string, authToken: string } {
  // useRuntimeConfig is there inside Nitro; scripts and tests outside it read the environment.
  try {
    const rc = useRuntimeConfig()
    return { url: rc.databaseUrl, authToken: rc.databaseAuthToken }
  }
  catch {
    return {
      url: process.env.NUXT_DATABASE_URL ?? 'file:./data/crosspoint.db',
      authToken: process.env.NUXT_DATABASE_AUTH_TOKEN ?? ''
    }
  }
}

type OpenHook = (db: Db) => Promise<unknown>
const openHooks: OpenHook[] = []
/**
 * Work to run once on the database when it is first opened, before anyone uses it: the start-up plugin registers
 * the data migrations here (they need domain helpers that import this module, so this module does not import them).
 */
export function onDatabaseOpen (hook: OpenHook): void {
  openHooks.push(hook)
}

/** The database, migrated. */
export async function useDb (): Promise<Db> {
  if (!ready) {
    const { url, authToken } = databaseConfig()
    ready = openDatabase(url, authToken).then(async (opened) => {
      for (const hook of openHooks) await hook(opened.db)
      return opened
    })
    ready.catch(() => {
      ready = undefined
    })
  }
  return (await ready).db
}

export async function useDbClient (): Promise<Client> {
  await useDb()
  return (await ready!).client
}
