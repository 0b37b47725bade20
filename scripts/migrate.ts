/** Applies pending migrations to NUXT_DATABASE_URL (the built server also does this at start). */
import { openDatabase } from '../server/utils/storage/db'

const url = process.env.NUXT_DATABASE_URL ?? 'file:./data/crosspoint.db'
openDatabase(url, process.env.NUXT_DATABASE_AUTH_TOKEN)
  .then(({ client }) => { client.close(); process.stdout.write(`Database at ${url} is up to date.\n`) })
  .catch((e) => { process.stderr.write(`Migration failed: ${(e as Error).message}\n`); process.exit(1) })
