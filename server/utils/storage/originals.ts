/** Uploaded originals (uploads, traces): kept in the file store under our own key, with their sha256 in uploaded_file. */
import { createHash, randomUUID } from 'node:crypto'
import { useDb, schema } from './db'
import { httpError } from '../http/errors'
import { KEY_PATTERN, useFileStore } from './files'

/** Keeps an uploaded original in the file store with its sha256; the key is ours, never the file name. */
export async function storeOriginal (
  versionId: number | null,
  uploadedBy: string,
  name: string,
  mediaType: string | undefined,
  buf: Uint8Array,
  /** how a spreadsheet was read (its column mapping), kept beside the original as provenance */
  mapping?: object
) {
  const sha256 = createHash('sha256').update(buf).digest('hex')
  const ext = (name.match(/\.(csv|tsv|txt|xlsx|json)$/i)?.[1] ?? 'bin').toLowerCase()
  const storageKey = `uploads/${versionId ?? 'none'}/${randomUUID()}.${ext}`
  await (await useFileStore()).put(storageKey, buf, mediaType)
  const db = await useDb()
  const [row] = await db
    .insert(schema.uploadedFiles)
    .values({
      versionId,
      uploadedBy,
      name: name.slice(0, 255),
      size: buf.byteLength,
      sha256,
      storageKey,
      mediaType: mediaType ?? null,
      mapping: (mapping ?? null) as Record<string, unknown> | null
    })
    .returning()
  return row!
}

export async function readOriginal (storageKey: string): Promise<Uint8Array> {
  if (!KEY_PATTERN.test(storageKey)) throw httpError(400, 'Bad storage key')
  const data = await (await useFileStore()).get(storageKey)
  if (!data) throw httpError(500, `A stored file is missing (${storageKey}); the fixity check names it for the admins`)
  return data
}
