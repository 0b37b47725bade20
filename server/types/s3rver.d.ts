// s3rver ships no type declarations: the part this project uses (the local fake S3 of demo and tests).
declare module 's3rver' {
  interface S3rverOptions { port?: number, address?: string, directory: string, silent?: boolean }
  export default class S3rver {
    constructor (options: S3rverOptions)
    run (): Promise<{ address: string, port: number }>
    close (): Promise<void>
  }
}
