import { createHash } from 'node:crypto'
import { DeleteObjectCommand, GetObjectCommand, HeadBucketCommand, HeadObjectCommand, ListObjectsV2Command, PutObjectCommand, S3Client, NotFound } from '@aws-sdk/client-s3'
import { platformConfig } from './config'
import { SharedBytes } from './body'
import { fileStoreFault } from './faults'

/** How long the store may stay silent (connecting, or mid-answer) before a request gives up. */
export const S3_TIMEOUT_DEFAULT_MS = 10_000

let client: S3Client | undefined

function useObjectStore(): { s3: S3Client; bucket: string } {
  const config = platformConfig().s3
  if (!client) {
    const timeoutMs = platformConfig().s3TimeoutMs || S3_TIMEOUT_DEFAULT_MS
    client = new S3Client({
      endpoint: config.endpoint || undefined,
      region: config.region,
      forcePathStyle: config.forcePathStyle,
      credentials: config.accessKeyId ? { accessKeyId: config.accessKeyId, secretAccessKey: config.secretAccessKey } : undefined,
      // The SDK's default checksums corrupt streamed uploads on the local fake; send them only when the API requires one.
      requestChecksumCalculation: 'WHEN_REQUIRED',
      responseChecksumValidation: 'WHEN_REQUIRED',
      // A stalled store answers within seconds: a connection must open, and a request may go
      // quiet, for at most timeoutMs; a whole request (25 MB at a slow link) gets six times that.
      requestHandler: { connectionTimeout: timeoutMs, socketTimeout: timeoutMs, requestTimeout: timeoutMs * 6, throwOnRequestTimeout: true },
      // One retry: a store that timed out twice is answered 503 rather than waited on.
      maxAttempts: 2,
    })
  }
  return { s3: client, bucket: config.bucket }
}

/** Drops the client, so the next exchange makes one from the configuration as it is then (a worker thread told of another store). */
export function forgetObjectStoreClient(): void {
  client?.destroy()
  client = undefined
}

/** Runs one exchange with the store; a store that is unavailable throws ServiceUnavailable. */
async function withStore<T>(work: (s3: S3Client, bucket: string) => Promise<T>): Promise<T> {
  const { s3, bucket } = useObjectStore()
  try {
    return await work(s3, bucket)
  } catch (err) {
    throw fileStoreFault(err)
  }
}

export function contentHash(bytes: Uint8Array): string {
  return createHash('sha256').update(bytes).digest('hex')
}

export async function putObject(key: string, body: Uint8Array, contentType: string): Promise<void> {
  await withStore((s3, bucket) => s3.send(new PutObjectCommand({ Bucket: bucket, Key: key, Body: body, ContentType: contentType, ContentLength: body.byteLength })))
}

export async function objectExists(key: string): Promise<boolean> {
  return withStore(async (s3, bucket) => {
    try {
      await s3.send(new HeadObjectCommand({ Bucket: bucket, Key: key }))
      return true
    } catch (err) {
      if (err instanceof NotFound || (err as { $metadata?: { httpStatusCode?: number } }).$metadata?.httpStatusCode === 404) return false
      throw err
    }
  })
}

/** A stored file's bytes, in shared memory (a worker thread reads them without a copy). */
export async function getObject(key: string): Promise<Buffer> {
  return withStore(async (s3, bucket) => {
    const r = await s3.send(new GetObjectCommand({ Bucket: bucket, Key: key }))
    const bytes = new SharedBytes(r.ContentLength ?? 0)
    for await (const chunk of r.Body as AsyncIterable<Uint8Array>) bytes.push(chunk)
    return bytes.bytes()
  })
}

export async function deleteObject(key: string): Promise<void> {
  await withStore((s3, bucket) => s3.send(new DeleteObjectCommand({ Bucket: bucket, Key: key })))
}

export interface StoredObject { key: string; lastModified: Date }

/** One page of the keys under a prefix (up to 1000), and the token for the next page. */
export async function listObjects(prefix: string, continuationToken?: string): Promise<{ objects: StoredObject[]; next?: string }> {
  return withStore(async (s3, bucket) => {
    const r = await s3.send(new ListObjectsV2Command({ Bucket: bucket, Prefix: prefix, ContinuationToken: continuationToken }))
    const objects = (r.Contents ?? []).filter((o) => o.Key).map((o) => ({ key: o.Key!, lastModified: o.LastModified ?? new Date() }))
    return { objects, next: r.IsTruncated ? r.NextContinuationToken : undefined }
  })
}

export async function checkBucket(): Promise<void> {
  await withStore((s3, bucket) => s3.send(new HeadBucketCommand({ Bucket: bucket })))
}
