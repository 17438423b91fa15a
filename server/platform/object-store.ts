import { createHash } from 'node:crypto'
import { DeleteObjectCommand, GetObjectCommand, HeadBucketCommand, HeadObjectCommand, PutObjectCommand, S3Client, NotFound } from '@aws-sdk/client-s3'
import { platformConfig } from './config'

let client: S3Client | undefined

function useObjectStore(): { s3: S3Client; bucket: string } {
  const config = platformConfig().s3
  if (!client) {
    client = new S3Client({
      endpoint: config.endpoint || undefined,
      region: config.region,
      forcePathStyle: config.forcePathStyle,
      credentials: config.accessKeyId ? { accessKeyId: config.accessKeyId, secretAccessKey: config.secretAccessKey } : undefined,
      // The SDK's default checksums corrupt streamed uploads on the local fake; send them only when the API requires one.
      requestChecksumCalculation: 'WHEN_REQUIRED',
      responseChecksumValidation: 'WHEN_REQUIRED',
    })
  }
  return { s3: client, bucket: config.bucket }
}

export function contentHash(bytes: Uint8Array): string {
  return createHash('sha256').update(bytes).digest('hex')
}

export async function putObject(key: string, body: Uint8Array, contentType: string): Promise<void> {
  const { s3, bucket } = useObjectStore()
  await s3.send(new PutObjectCommand({ Bucket: bucket, Key: key, Body: body, ContentType: contentType, ContentLength: body.byteLength }))
}

export async function objectExists(key: string): Promise<boolean> {
  const { s3, bucket } = useObjectStore()
  try {
    await s3.send(new HeadObjectCommand({ Bucket: bucket, Key: key }))
    return true
  } catch (err) {
    if (err instanceof NotFound || (err as { $metadata?: { httpStatusCode?: number } }).$metadata?.httpStatusCode === 404) return false
    throw err
  }
}

export async function getObject(key: string): Promise<Buffer> {
  const { s3, bucket } = useObjectStore()
  const r = await s3.send(new GetObjectCommand({ Bucket: bucket, Key: key }))
  return Buffer.from(await r.Body!.transformToByteArray())
}

export async function deleteObject(key: string): Promise<void> {
  const { s3, bucket } = useObjectStore()
  await s3.send(new DeleteObjectCommand({ Bucket: bucket, Key: key }))
}

export async function checkBucket(): Promise<void> {
  const { s3, bucket } = useObjectStore()
  await s3.send(new HeadBucketCommand({ Bucket: bucket }))
}
