/** Fixity: re-hash every stored upload (whichever file store holds it) and compare with the sha256 recorded when it arrived. */
import { createHash } from 'node:crypto'
import { resolve } from 'node:path'
import { useFileStore } from './files'
import { useDb, schema } from './db'

export function dataDirectory (): string {
  let d = './data'
  try {
    d = useRuntimeConfig().dataDir
  }
  catch {
    d = process.env.NUXT_DATA_DIR ?? d
  }
  return resolve(process.cwd(), d)
}

export async function checkFixity () {
  const db = await useDb()
  const files = await db.select().from(schema.uploadedFiles)
  const store = await useFileStore()
  const problems: { id: number, name: string, storageKey: string, problem: string }[] = []
  for (const f of files) {
    const buf = await store.get(f.storageKey).catch(() => null)
    if (!buf) {
      problems.push({ id: f.id, name: f.name, storageKey: f.storageKey, problem: 'missing' })
      continue
    }
    const sha = createHash('sha256').update(buf).digest('hex')
    if (sha !== f.sha256 || buf.byteLength !== f.size)
      problems.push({
        id: f.id,
        name: f.name,
        storageKey: f.storageKey,
        problem: `changed: sha256 ${sha.slice(0, 12)}… (recorded ${f.sha256.slice(0, 12)}…)`
      })
  }
  return { checkedAt: new Date().toISOString(), files: files.length, store: store.describe(), problems }
}
