// eslint-disable-next-line @typescript-eslint/triple-slash-reference -- s3rver has no types; every importing project needs them
/// <reference path="../../types/s3rver.d.ts" />
/**
 * Stored files (uploads, traces) behind one interface with two drivers: a local folder (the default, embedded)
 * and S3-compatible object storage through the AWS SDK. With the S3 driver and no endpoint configured, a
 * local fake S3 server (s3rver) is started on a loopback port with its files under the data folder, like the
 * mail sink: demo and tests run it by themselves. Keys are ours ("uploads/<version>/<uuid>.<ext>"), never a
 * file name.
 */
import { mkdir, readdir, readFile, stat, writeFile } from 'node:fs/promises'
import { dirname, join, relative, resolve } from 'node:path'
import {
  CreateBucketCommand, GetObjectCommand, HeadBucketCommand, ListObjectsV2Command, PutObjectCommand, S3Client
} from '@aws-sdk/client-s3'

export interface StoredFile { key: string, size: number }
export interface FileStore {
  readonly kind: 'local' | 's3'
  put: (key: string, data: Uint8Array, mediaType?: string) => Promise<void>
  /** The file's bytes, or null when there is no such file. */
  get: (key: string) => Promise<Uint8Array | null>
  list: (prefix: string) => AsyncIterable<StoredFile>
  describe: () => string
}

export const KEY_PATTERN = /^(uploads)\/[\w-]+\/[\w-]+\.\w+$/

export class LocalStore implements FileStore {
  readonly kind = 'local'
  constructor (readonly root: string) {}
  async put (key: string, data: Uint8Array): Promise<void> {
    const path = join(this.root, key)
    await mkdir(dirname(path), { recursive: true })
    await writeFile(path, data)
  }

  async get (key: string): Promise<Uint8Array | null> {
    return readFile(join(this.root, key)).then(b => new Uint8Array(b), () => null)
  }

  async* list (prefix: string): AsyncIterable<StoredFile> {
    const walk = async function* (d: string, root: string): AsyncIterable<StoredFile> {
      for (const e of await readdir(d, { withFileTypes: true }).catch(() => [])) {
        const p = join(d, e.name)
        if (e.isDirectory()) yield* walk(p, root)
        else if (e.isFile()) yield { key: relative(root, p).split('\\').join('/'), size: (await stat(p)).size }
      }
    }
    yield* walk(join(this.root, prefix), this.root)
  }

  describe (): string {
    return `local folder ${this.root}`
  }
}

export interface S3Settings {
  endpoint?: string
  region: string
  bucket: string
  accessKeyId: string
  secretAccessKey: string
  prefix?: string
}

export class S3Store implements FileStore {
  readonly kind = 's3'
  readonly client: S3Client
  private ready: Promise<void> | undefined
  constructor (readonly s: S3Settings) {
    this.client = new S3Client({
      endpoint: s.endpoint || undefined,
      region: s.region,
      forcePathStyle: !!s.endpoint,
      credentials: s.accessKeyId ? { accessKeyId: s.accessKeyId, secretAccessKey: s.secretAccessKey } : undefined,
      // checksums only where S3 requires them: S3-compatible servers differ in the newer checksum headers
      requestChecksumCalculation: 'WHEN_REQUIRED',
      responseChecksumValidation: 'WHEN_REQUIRED'
    })
  }

  private k (key: string) {
    return (this.s.prefix ?? '') + key
  }

  /** The bucket, created when it does not exist (fake and fresh buckets). */
  private bucket (): Promise<void> {
    this.ready ??= this.client.send(new HeadBucketCommand({ Bucket: this.s.bucket })).then(
      () => undefined,
      () => this.client.send(new CreateBucketCommand({ Bucket: this.s.bucket })).then(() => undefined)
    )
    this.ready.catch(() => {
      this.ready = undefined
    })
    return this.ready
  }

  async put (key: string, data: Uint8Array, mediaType?: string): Promise<void> {
    await this.bucket()
    await this.client.send(new PutObjectCommand({ Bucket: this.s.bucket, Key: this.k(key), Body: data, ContentType: mediaType }))
  }

  async get (key: string): Promise<Uint8Array | null> {
    await this.bucket()
    try {
      const r = await this.client.send(new GetObjectCommand({ Bucket: this.s.bucket, Key: this.k(key) }))
      return await r.Body!.transformToByteArray()
    }
    catch (e) {
      const status = (e as { $metadata?: { httpStatusCode?: number } }).$metadata?.httpStatusCode
      if ((e as { name?: string }).name === 'NoSuchKey' || status === 404) return null
      throw e
    }
  }

  async* list (prefix: string): AsyncIterable<StoredFile> {
    await this.bucket()
    let token: string | undefined
    do {
      const r = await this.client.send(
        new ListObjectsV2Command({ Bucket: this.s.bucket, Prefix: this.k(prefix), ContinuationToken: token })
      )
      for (const o of r.Contents ?? []) yield { key: o.Key!.slice((this.s.prefix ?? '').length), size: o.Size ?? 0 }
      token = r.IsTruncated ? r.NextContinuationToken : undefined
    } while (token)
  }

  describe (): string {
    return `S3 bucket ${this.s.bucket}${this.s.endpoint ? ` at ${this.s.endpoint}` : ''}`
  }
}

/** The settings in force: Nitro's runtime config inside the server, the environment in scripts. */
export function storageSettings (): { driver: string, dataDir: string, s3: S3Settings } {
  let rc: Record<string, unknown>
  try {
    rc = useRuntimeConfig() as unknown as Record<string, unknown>
  }
  catch {
    const e = process.env
    rc = {
      dataDir: e.NUXT_DATA_DIR ?? './data', storageDriver: e.NUXT_STORAGE_DRIVER ?? 'local', s3Endpoint: e.NUXT_S3_ENDPOINT ?? '',
      s3Region: e.NUXT_S3_REGION ?? 'us-east-1', s3Bucket: e.NUXT_S3_BUCKET ?? 'crosspoint', s3AccessKeyId: e.NUXT_S3_ACCESS_KEY_ID ?? '',
      s3SecretAccessKey: e.NUXT_S3_SECRET_ACCESS_KEY ?? '', s3Prefix: e.NUXT_S3_PREFIX ?? ''
    }
  }
  return {
    driver: String(rc.storageDriver || 'local'),
    dataDir: resolve(process.cwd(), String(rc.dataDir || './data')),
    s3: {
      endpoint: String(rc.s3Endpoint ?? ''), region: String(rc.s3Region || 'us-east-1'), bucket: String(rc.s3Bucket || 'crosspoint'),
      accessKeyId: String(rc.s3AccessKeyId ?? ''), secretAccessKey: String(rc.s3SecretAccessKey ?? ''), prefix: String(rc.s3Prefix ?? '')
    }
  }
}

/** Starts the local fake S3 (s3rver) with its files under the data folder; resolves to its endpoint. */
export async function startFakeS3 (directory: string): Promise<{ endpoint: string, close: () => Promise<void> }> {
  const { default: S3rver } = await import('s3rver')
  await mkdir(directory, { recursive: true })
  const server = new S3rver({ port: 0, address: '127.0.0.1', directory, silent: true })
  const { port } = await server.run()
  return { endpoint: `http://127.0.0.1:${port}`, close: () => server.close() }
}

let store: Promise<FileStore> | undefined
export function useFileStore (): Promise<FileStore> {
  store ??= (async () => {
    const { driver, dataDir, s3 } = storageSettings()
    if (driver === 'local') return new LocalStore(dataDir)
    if (driver !== 's3') throw new Error(`NUXT_STORAGE_DRIVER must be "local" or "s3", not "${driver}"`)
    if (s3.endpoint || s3.accessKeyId) return new S3Store(s3)
    const fake = await startFakeS3(join(dataDir, 's3-fake'))
    // s3rver takes any key pair that is its own (S3RVER/S3RVER)
    return new S3Store({ ...s3, endpoint: fake.endpoint, accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER' })
  })()
  store.catch(() => {
    store = undefined
  })
  return store
}
