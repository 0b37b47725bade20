/** npm run restore -- <backup folder>: verifies every checksum and the copy's integrity, then replaces the database and files. Stop the server first. */
import { restore } from '../server/utils/storage/backup'
import { useFileStore } from '../server/utils/storage/files'

const folder = process.argv[2]
if (!folder) { process.stderr.write('Usage: npm run restore -- <backup folder>\n'); process.exit(2) }
const res = await restore({ folder, databaseUrl: process.env.NUXT_DATABASE_URL ?? 'file:./data/crosspoint.db', dataDir: process.env.NUXT_DATA_DIR ?? './data', store: await useFileStore() })
  .catch((e) => { process.stderr.write(`Restore refused: ${(e as Error).message}\n`); process.exit(1) })
process.stdout.write(`Restored from ${folder}. The replaced database was kept as ${res.kept}.\n`)
process.exit(0)
