/**
 * Identifiers reserved as drafts whose version was published (the registrar failed after the commit, or the
 * process stopped in between) are made findable: shortly after start, then every five minutes.
 */
import { reconcileIdentifiers } from '../utils/review'
import { consola } from 'consola'
import { countOf } from '../../shared/vocabulary'

export default defineNitroPlugin(() => {
  const run = () => {
    reconcileIdentifiers()
      .then((r) => {
        if (r.madeFindable) consola.info(`[crosspoint] identifiers: ${countOf(r.madeFindable, 'version')} made findable`)
      })
      .catch(() => {})
  }
  setTimeout(run, 5_000).unref()
  setInterval(run, 5 * 60e3).unref()
})
