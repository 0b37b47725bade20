/**
 * Identifiers reserved as drafts whose version was published (the registrar failed after the commit, or the
 * process stopped in between) are made findable: shortly after start, then every five minutes.
 */
import { reconcileIdentifiers } from '../utils/review'

export default defineNitroPlugin(() => {
  const run = () => {
    reconcileIdentifiers()
      .then((r) => {
        if (r.madeFindable) console.log(`[crosspoint] identifiers: ${r.madeFindable} version(s) made findable`)
      })
      .catch(() => {})
  }
  setTimeout(run, 5_000).unref()
  setInterval(run, 5 * 60e3).unref()
})
