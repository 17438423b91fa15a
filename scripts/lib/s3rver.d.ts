// The few parts of s3rver (the local S3 fake) that scripts/lib/services.ts uses; it ships no types.
declare module 's3rver' {
  export interface S3rverOptions {
    port?: number
    address?: string
    directory?: string
    silent?: boolean
    configureBuckets?: { name: string; configs: unknown[] }[]
  }
  export default class S3rver {
    constructor(options: S3rverOptions)
    run(): Promise<{ address: string; port: number }>
    close(callback?: () => void): Promise<void>
  }
}
