/** A daily fixity check of stored uploads; mismatches are written to the log for the admins. */
import { checkFixity } from '../utils/storage/fixity'
import { consola } from 'consola'
import { countOf } from '../../shared/vocabulary'

export default defineNitroPlugin(() => {
  const timer = setInterval(() => {
    checkFixity()
      .then((r) => {
        if (r.problems.length)
          consola.error(
            `[crosspoint] fixity: ${countOf(r.problems.length, 'stored file')} missing or changed: `
            + r.problems.map(p => p.storageKey).join(', ')
          )
      })
      .catch(() => {})
  }, 24 * 3600e3)
  timer.unref()
})
