import { requireRole } from '../../../utils/accounts/auth'
import { audit } from '../../../utils/storage/audit'
import { backup } from '../../../utils/storage/backup'
import { dataDirectory } from '../../../utils/storage/fixity'
import { useFileStore } from '../../../utils/storage/files'

defineRouteMeta({
  openAPI: {
    tags: ['admin'],
    summary: 'Take an online backup of the database and stored files into a dated, checksummed folder (admin)'
  }
})

export default defineEventHandler(async (event) => {
  const admin = await requireRole(event, 'admin')
  const rc = useRuntimeConfig()
  const res = await backup({
    databaseUrl: rc.databaseUrl,
    dataDir: dataDirectory(),
    backupDir: process.env.NUXT_BACKUP_DIR ?? `${dataDirectory()}/backups`,
    store: await useFileStore()
  })
  await audit(admin.id, 'admin.backup', 'system', 'database', { folder: res.folder, records: res.records })
  return res
})
