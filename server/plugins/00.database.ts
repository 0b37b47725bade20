/**
 * Start-up: refuse the demo session secret in production, open and migrate the database; a server that cannot
 * stops with a clear message.
 */
import { writeFileSync, rmSync } from 'node:fs'
import { consola } from 'consola'
import { secretProblem } from '../utils/accounts/demo-secret'
import { resolveFileUrl, serverMarkPath } from '../utils/storage/backup'
import { onDatabaseOpen, useDb } from '../utils/storage/db'
import { applyDataMigrations } from '../utils/review/derivations'

/** Marks the database file as used by this server, so that a restore refuses to replace it under us. */
function markDatabaseInUse (): void {
  const url = useRuntimeConfig().databaseUrl
  if (!url.startsWith('file:')) return
  const mark = serverMarkPath(resolveFileUrl(url))
  writeFileSync(mark, `${process.pid}`)
  const clear = () => {
    try {
      rmSync(mark, { force: true })
    }
    catch {
      /* already gone */
    }
  }
  process.once('exit', clear)
}

export default defineNitroPlugin(async () => {
  const problem = secretProblem(useRuntimeConfig().authSecret, process.env, import.meta.dev)
  if (problem) {
    consola.error(`[crosspoint] start-up refused: ${problem}`)
    process.exit(1)
  }
  try {
    onDatabaseOpen(applyDataMigrations)
    await useDb()
    markDatabaseInUse()
  }
  catch (e) {
    consola.error(`[crosspoint] start-up failed: ${(e as Error).message}`)
    process.exit(1)
  }
})
