import { describe, expect, it } from 'vitest'
import { platformConfigFromEnv, workConcurrency } from '../../../../server/platform/env-config'

describe('settings for processes without Nitro', () => {
  it('reads the NUXT_* variables the app reads, with the same defaults', () => {
    const c = platformConfigFromEnv({ NUXT_DATABASE_URL: 'postgres://db.example/dw', NUXT_S3_BUCKET: 'decals', NUXT_S3_FORCE_PATH_STYLE: 'false', NUXT_S3_TIMEOUT_MS: '2500' })
    expect(c.databaseUrl).toBe('postgres://db.example/dw')
    expect(c.s3).toMatchObject({ bucket: 'decals', region: 'us-east-1', forcePathStyle: false })
    expect(c.s3TimeoutMs).toBe(2500)
    expect(c.dbQueryTimeoutMs).toBe(15000)
    expect(platformConfigFromEnv({}).s3.forcePathStyle).toBe(true)
    expect(platformConfigFromEnv({ NUXT_DB_QUERY_TIMEOUT_MS: 'soon' }).dbQueryTimeoutMs).toBe(15000)
  })

  it('runs one job per core unless told otherwise, and at least one', () => {
    expect(workConcurrency({}, 2)).toBe(2)
    expect(workConcurrency({ NUXT_WORK_CONCURRENCY: '3' }, 2)).toBe(3)
    expect(workConcurrency({ NUXT_WORK_CONCURRENCY: '0' }, 2)).toBe(1)
  })
})
