/**
 * Start-up: refuse the demo session secret in production, open and migrate the database; a server that cannot
 * stops with a clear message.
 */
import { writeFileSync, rmSync } from 'node:fs'
import { secretProblem } from '../utils/accounts/demo-secret'
import { resolveFileUrl, serverMarkPath } from '../utils/storage/backup'
import { onDatabaseOpen, useDb } from '../utils/storage/db'
import { applyDataMigrations } from '../utils/review/derivations'

/** Marks the database file as used by this server, so that a restore refuses to replace it under us. */
function markDatabaseInUse (): void {
  const url = useRuntimeConfig().databaseUrl
  if (!url.startsWith('file:')) return
  const mark = serverMarkPath(resolveFileUrl(url))
  writeFileSync(mark, `${process.pid}\n`)
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
    console.error(`\n[crosspoint] start-up refused: ${problem}\n`)
    process.exit(1)
  }
  try {
    onDatabaseOpen(applyDataMigrations)
    await useDb()
    markDatabaseInUse()
  }
  catch (e) {
    console.error(`\n[crosspoint] start-up failed: ${(e as Error).message}\n`)
    process.exit(1)
  }
})
