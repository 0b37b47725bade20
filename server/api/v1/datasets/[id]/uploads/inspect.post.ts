import { requireDraftForFile } from '../../../../../utils/deposit/drafts'
import { readGrid } from '../../../../../utils/deposit/check'
import { FileProblem, MAX_FILE_BYTES } from '../../../../../utils/deposit/parse'
import { mappingField, savedMappingFor } from '../../../../../utils/deposit/mappings'
import { extraHeaderWords, solventNames } from '../../../../../utils/deposit/header-synonyms'
import { readUploadedFile } from '../../../../../utils/http/body'
import { httpError } from '../../../../../utils/http/errors'
import { intParam } from '../../../../../utils/http/params'
import { applyMapping, headerSignature, proposeMapping } from '../../../../../../shared/records/mapping'

defineRouteMeta({
  openAPI: {
    tags: ['deposit'],
    summary:
      'The mapping step: read a sheet of your own (multipart "file", optionally "mapping" and "sheet") and answer its first '
      + 'rows, the sheets, the proposed (or your lab\'s saved) mapping to the open format\'s fields and units, and a preview '
      + 'of the first rows read with it; nothing is kept'
  }
})

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const draft = await requireDraftForFile(event, id, MAX_FILE_BYTES)
  const file = await readUploadedFile(event, MAX_FILE_BYTES)
  try {
    const given = mappingField(file.fields.mapping)
    const { kind, grid, sheets, sheet } = await readGrid(file.filename, file.type, file.data, given?.sheet ?? file.fields.sheet)
    const proposed = proposeMapping(grid, await extraHeaderWords(), await solventNames())
    const saved = await savedMappingFor(draft.dataset.labId, headerSignature(grid[proposed.headerRow - 1] ?? []))
    const mapping = given ?? saved?.mapping ?? proposed
    const preview = applyMapping(grid.slice(0, Math.max(mapping.firstDataRow + 9, 40)), mapping)
    return {
      kind, sheets, sheet, rowCount: grid.length,
      rows: grid.slice(0, 40),
      mapping: { ...mapping, ...(sheet ? { sheet } : {}) },
      source: given ? 'given' : saved ? 'saved' : 'proposed',
      saved: saved ? { id: saved.id, name: saved.name } : null,
      preview: { headers: preview.headers, rows: preview.rows.slice(0, 10), rowNumbers: preview.rowNumbers.slice(0, 10) }
    }
  }
  catch (e) {
    if (e instanceof FileProblem) throw httpError(e.status, e.message, e.issues)
    throw e
  }
})
