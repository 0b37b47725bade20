/** npm run alerts: runs the saved-search digest job once (every search with new matches gets its digest). */
import { runAlerts } from '../server/utils/alerts/digest'

try {
  const r = await runAlerts()
  process.stdout.write(`Saved searches checked: ${r.searches}; digests mailed: ${r.digests} (${r.records} records).\n`)
  process.exit(0)
}
catch (e) {
  process.stderr.write(`The alert run failed: ${(e as Error).message}\n`)
  process.exit(1)
}
