// archiver 8 ships no type declarations (and @types/archiver describes the v6 API): the part this project uses.
declare module 'archiver' {
  import type { Readable, Transform } from 'node:stream'

  export interface ZipOptions { zlib?: { level?: number } }
  export class ZipArchive extends Transform {
    constructor (options?: ZipOptions)
    append (source: Readable | Buffer | string, data: { name: string }): this
    finalize (): Promise<void>
    abort (): this
  }
}
