/** Start-up: build the search index from the database, then keep it in step with changes other instances make. */
import { syncFromDatabase, useSearch } from '../utils/search/search'

export default defineNitroPlugin(() => {
  useSearch().catch(e => console.error(`[crosspoint] search index: ${(e as Error).message}`))
  const timer = setInterval(() => {
    syncFromDatabase().catch(() => {})
  }, 15_000)
  timer.unref()
})
