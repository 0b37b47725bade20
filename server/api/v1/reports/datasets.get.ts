import { requireRole } from '../../../utils/accounts/auth'
import { queryValidated } from '../../../utils/http/validation'
import { USAGE_REPORT_QUERY } from '../../../utils/http/query-schemas'
import { useDb } from '../../../utils/storage/db'
import { publicUrl } from '../../../utils/services/mail'
import { flushUsage } from '../../../utils/usage/counter'
import { datasetReport } from '../../../utils/usage/dsr'
import { checkPeriod } from '../../../utils/usage/report'

defineRouteMeta({
  openAPI: {
    tags: ['usage'],
    summary:
      'Admins: usage of every dataset over a period as a COUNTER research-data Dataset Report (DSR, release rd1) '
      + 'in JSON: per dataset and month, total and unique investigations and requests by access method'
  }
})

export default defineEventHandler(async (event) => {
  await requireRole(event, 'admin')
  const q = queryValidated<{ begin: string, end: string }>(event, USAGE_REPORT_QUERY, x => x)
  const begin = q.begin.slice(0, 7)
  const end = q.end.slice(0, 7)
  checkPeriod(begin, end, ['begin', 'end'])
  await flushUsage()
  return datasetReport(await useDb(), begin, end, publicUrl('').replace(/\/$/, ''))
})
