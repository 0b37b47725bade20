import { useDb, schema } from '../../../utils/storage/db'

defineRouteMeta({
  openAPI: {
    tags: ['reference'],
    summary: 'Solvent reference table (permittivity, refractive index, viscosity, source)'
  }
})

export default defineEventHandler(async () => {
  const db = await useDb()
  return { items: await db.select().from(schema.solvents).orderBy(schema.solvents.name) }
})
