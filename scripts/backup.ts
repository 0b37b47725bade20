/** npm run backup: a dated, checksummed backup of the database and stored files (online: the server may keep running). */
import { backup } from '../server/utils/storage/backup'
import { useFileStore } from '../server/utils/storage/files'

const res = await backup({
  databaseUrl: process.env.NUXT_DATABASE_URL ?? 'file:./data/crosspoint.db',
  dataDir: process.env.NUXT_DATA_DIR ?? './data',
  backupDir: process.env.NUXT_BACKUP_DIR ?? './backups',
  store: await useFileStore()
}).catch((e) => { process.stderr.write(`Backup failed: ${(e as Error).message}\n`); process.exit(1) })
process.stdout.write(`Backup written to ${res.folder}: ${res.files} files, ${(res.bytes / 1048576).toFixed(1)} MB, ${res.records} records, ${res.publishedVersions} published versions.\n`)
process.exit(0)
