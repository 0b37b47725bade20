import { csvTemplate, jsonTemplate, xlsxTemplate } from '../../../utils/deposit/templates'
import { httpError } from '../../../utils/http/errors'

defineRouteMeta({
  openAPI: {
    tags: ['deposit'],
    summary: 'Upload templates: records.csv, records.xlsx (with a notes sheet) or records.json',
    parameters: [
      {
        in: 'path',
        name: 'file',
        required: true,
        schema: { type: 'string', enum: ['records.csv', 'records.xlsx', 'records.json'] }
      }
    ]
  }
})

const TEMPLATES: Record<string, { type: string, make: () => unknown }> = {
  'records.csv': { type: 'text/csv; charset=utf-8', make: csvTemplate },
  'records.json': { type: 'application/json; charset=utf-8', make: jsonTemplate },
  'records.xlsx': { type: 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet', make: xlsxTemplate }
}

export default defineEventHandler(async (event) => {
  // the parameter is checked against the table (own keys only) before it goes anywhere near a header
  const file = getRouterParam(event, 'file') ?? ''
  if (!Object.hasOwn(TEMPLATES, file)) throw httpError(404, 'Templates: records.csv, records.xlsx, records.json')
  const t = TEMPLATES[file]!
  setHeader(event, 'content-disposition', `attachment; filename="crosspoint-${file}"`)
  setHeader(event, 'content-type', t.type)
  return t.make()
})
