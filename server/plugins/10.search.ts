/** Start-up: build the search index from the database, then keep it in step with changes other instances make. */
import { syncFromDatabase, useSearch } from '../utils/search/search'
import { consola } from 'consola'

export default defineNitroPlugin(() => {
  useSearch().catch(e => consola.error(`[crosspoint] search index: ${(e as Error).message}`))
  const timer = setInterval(() => {
    syncFromDatabase().catch(() => {})
  }, 15_000)
  timer.unref()
})
