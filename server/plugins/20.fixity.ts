/** A daily fixity check of stored uploads; mismatches are written to the log for the admins. */
import { checkFixity } from '../utils/storage/fixity'

export default defineNitroPlugin(() => {
  const timer = setInterval(() => {
    checkFixity()
      .then((r) => {
        if (r.problems.length)
          console.error(
            `[crosspoint] fixity: ${r.problems.length} stored file(s) missing or changed: ${r.problems.map(p => p.storageKey).join(', ')}`
          )
      })
      .catch(() => {})
  }, 24 * 3600e3)
  timer.unref()
})
