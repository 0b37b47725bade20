import { defineConfig } from 'drizzle-kit'

export default defineConfig({
  dialect: 'sqlite',
  schema: './server/database/schema/index.ts',
  out: './drizzle',
  dbCredentials: { url: process.env.NUXT_DATABASE_URL ?? 'file:./data/crosspoint.db' }
})
