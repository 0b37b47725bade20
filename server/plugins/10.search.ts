/** Start-up: build the search index from the database, then keep it in step with changes other instances make. */
import { syncFromDatabase, useSearch } from '../utils/search/search'
import { consola } from 'consola'

export default defineNitroPlugin(() => {
  useSearch().catch(e => consola.error(`[crosspoint] search index: ${(e as Error).message}`))
  // other instances' writes arrive within this many seconds (one indexed query on dataset_version.updated_at)
  const every = Math.max(1, Number(useRuntimeConfig().searchSyncSeconds) || 2)
  const timer = setInterval(() => {
    syncFromDatabase().catch(() => {})
  }, every * 1000)
  timer.unref()
})
