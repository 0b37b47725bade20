/**
 * Usage counts are written once a second by the counter; the last ones are written when the server closes.
 * The saved-search digests run on a schedule: every `alertsCheckMinutes` the searches last checked more than
 * `alertsEveryHours` ago are looked at (0 hours: no schedule; `npm run alerts` or the admin page then runs it).
 */
import { consola } from 'consola'
import { flushUsage } from '../utils/usage/counter'
import { runAlerts } from '../utils/alerts/digest'

export default defineNitroPlugin((nitroApp) => {
  nitroApp.hooks.hook('close', () => flushUsage())
  const { alertsEveryHours, alertsCheckMinutes } = useRuntimeConfig()
  const every = Number(alertsEveryHours)
  if (!(every > 0)) return
  const timer = setInterval(() => {
    runAlerts({ dueBefore: new Date(Date.now() - every * 3600e3) })
      .then((r) => {
        if (r.digests) consola.info(`[crosspoint] alerts: ${r.digests} digests, ${r.records} records`)
      })
      .catch(e => consola.error(`[crosspoint] alerts: ${(e as Error).message}`))
  }, Math.max(1, Number(alertsCheckMinutes)) * 60e3)
  timer.unref()
})
