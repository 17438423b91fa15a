import { inject } from 'vitest'
import { GetObjectCommand, ListObjectsV2Command, PutObjectCommand, S3Client } from '@aws-sdk/client-s3'

let client: S3Client | undefined
function s3() {
  const c = inject('s3')
  client ??= new S3Client({ endpoint: c.endpoint, region: 'us-east-1', forcePathStyle: true, credentials: { accessKeyId: c.accessKeyId, secretAccessKey: c.secretAccessKey } })
  return client
}

/** Every key in the test bucket (straight from the object store, not through the app). */
export async function allKeys(): Promise<string[]> {
  const keys: string[] = []
  let token: string | undefined
  do {
    const r = await s3().send(new ListObjectsV2Command({ Bucket: inject('s3').bucket, ContinuationToken: token }))
    for (const o of r.Contents ?? []) keys.push(o.Key!)
    token = r.IsTruncated ? r.NextContinuationToken : undefined
  } while (token)
  return keys.sort()
}

/** Stores a file straight in the test bucket (a clean vector made by a test, say). */
export async function putKey(key: string, body: string | Uint8Array, contentType: string): Promise<void> {
  await s3().send(new PutObjectCommand({ Bucket: inject('s3').bucket, Key: key, Body: body, ContentType: contentType }))
}

/** A stored file's text, straight from the test bucket (a layer's vector, say). */
export async function getKeyText(key: string): Promise<string> {
  const r = await s3().send(new GetObjectCommand({ Bucket: inject('s3').bucket, Key: key }))
  return r.Body!.transformToString('utf8')
}
