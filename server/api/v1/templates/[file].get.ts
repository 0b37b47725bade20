import { csvTemplate, jsonTemplate, xlsxTemplate } from '../../../utils/deposit/templates'
import { httpError } from '../../../utils/errors'

defineRouteMeta({ openAPI: { tags: ['deposit'], summary: 'Upload templates: records.csv, records.xlsx (with a notes sheet) or records.json' } })

export default defineEventHandler(async (event) => {
  const file = getRouterParam(event, 'file')
  setHeader(event, 'content-disposition', `attachment; filename="crosspoint-${file}"`)
  if (file === 'records.csv') { setHeader(event, 'content-type', 'text/csv; charset=utf-8'); return csvTemplate() }
  if (file === 'records.json') { setHeader(event, 'content-type', 'application/json; charset=utf-8'); return jsonTemplate() }
  if (file === 'records.xlsx') { setHeader(event, 'content-type', 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet'); return xlsxTemplate() }
  throw httpError(404, 'Templates: records.csv, records.xlsx, records.json')
})
