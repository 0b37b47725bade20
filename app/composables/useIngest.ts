/** The same row → record → check pipeline the server runs, in the browser (standalone ajv validator). */
import { ingestRow, type Cell, type IngestContext, type SchemaValidator } from '#shared/records/ingest'
import validateRecordSchema from '#shared/records/generated/rate-record.validate.mjs'

export async function useIngest () {
  const { data } = await useFetch('/api/v1/solvents')
  const ctx = computed<IngestContext>(() => ({
    solvents: new Map(
      (data.value?.items ?? []).map(s => [
        s.name.toLowerCase(),
        { name: s.name, permittivity: s.permittivity, refractiveIndex: s.refractiveIndex, viscosity: s.viscosity }
      ])
    )
  }))
  const solventNames = computed(() => (data.value?.items ?? []).map(s => s.name))
  const check = (cells: Record<string, Cell>, units: Record<string, string | undefined>) =>
    ingestRow(cells, units, validateRecordSchema as SchemaValidator, ctx.value)
  return { check, solventNames, ctx }
}
