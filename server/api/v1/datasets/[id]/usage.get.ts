import { getViewer } from '../../../../utils/accounts/auth'
import { getDataset } from '../../../../utils/publishing/archive'
import { intParam } from '../../../../utils/http/params'
import { queryValidated } from '../../../../utils/http/validation'
import { USAGE_QUERY } from '../../../../utils/http/query-schemas'
import { useDb } from '../../../../utils/storage/db'
import { flushUsage } from '../../../../utils/usage/counter'
import { addMonths, checkPeriod, datasetUsage } from '../../../../utils/usage/report'

defineRouteMeta({
  openAPI: {
    tags: ['usage'],
    summary:
      'Views and downloads of a dataset counted by the COUNTER Code of Practice for Research Data: investigations '
      + '(landing page, record pages, citations) and requests (bundle downloads), each total and unique per user-session, '
      + 'with the 30-second double-click rule, robots excluded and machine access (API tokens) also given apart; per month'
  }
})

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const q = queryValidated<{ from?: string, until?: string }>(event, USAGE_QUERY, x => x)
  await getDataset(await getViewer(event), id)
  const until = q.until ?? new Date().toISOString().slice(0, 7)
  const from = q.from ?? addMonths(until, -11)
  checkPeriod(from, until)
  await flushUsage()
  return datasetUsage(await useDb(), id, from, until)
})
