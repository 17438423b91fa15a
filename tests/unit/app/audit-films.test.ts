import { describe, expect, it } from 'vitest'
import { describeAudit } from '../../../app/utils/audit'
import type { AuditEntry } from '../../../shared/types/api'

const line = (action: string, detail: Record<string, unknown>, subjectId = '12'): AuditEntry =>
  ({ id: 1, at: '2026-01-01T00:00:00.000Z', action, actor: { id: 1, name: 'Bram' }, subjectType: 'job', subjectId, detail }) as AuditEntry

describe('history sentences for the film library and corrections', () => {
  it('tells each new line in words', () => {
    expect(describeAudit(line('cancel-job', { title: 'Kite', reason: 'asked twice' })).sentence).toBe('Bram cancelled job 12 (“Kite”): asked twice')
    expect(describeAudit(line('fail-job', { title: 'Kite', failure: 'burnt', note: 'flare', recutJobId: 13 })).sentence).toBe('Bram recorded that job 12 (“Kite”) failed: burnt, flare; recut as job 13')
    expect(describeAudit(line('recut', { title: 'Kite', quantity: 2, robot: 'Osprey', recutOf: 12 }, '13')).sentence).toBe('Bram queued a recut of 2 × “Kite” after job 12 failed (job 13)')
    expect(describeAudit(line('edit-placement', { title: 'Kite', robot: 'Osprey', changes: { widthMm: { from: 50, to: 60 } } })).sentence).toBe('Bram changed “Kite” on Osprey: width (mm) 50 → 60')
    expect(describeAudit(line('apply-spare', { title: 'Kite', robot: 'Osprey', spot: 'front', count: 1, reason: 'torn' })).sentence).toBe('Bram put 1 spare “Kite” on the front of Osprey (torn)')
    expect(describeAudit(line('approve-film', { name: 'Satin PU', polymer: 'PU', safetyDataSheet: 'SDS rev. 2' })).sentence).toBe('Bram recorded the lab\'s approval of Satin PU (PU), judged on SDS rev. 2')
    expect(describeAudit(line('test-film', { name: 'Clear', square: 'C4', powerPct: 60, speedMmS: 20 })).sentence).toBe('Bram recorded a test cut of Clear: square C4 weeded cleanly at 60 % and 20 mm/s')
    expect(describeAudit(line('film-stock', { name: 'Clear', kind: 'delivery', sheets: 8, onHand: 10 })).sentence).toBe('Bram recorded a delivery of 8 sheets of Clear (10 on hand)')
    expect(describeAudit(line('edit-robot', { name: 'Osprey', season: '2026–27', from: { name: 'Heron', season: '2026–27' } })).sentence).toBe('Bram renamed the robot Heron to Osprey')
    expect(describeAudit(line('rename-artwork', { from: 'Kite', to: 'Kite crest' })).sentence).toBe('Bram renamed the artwork “Kite” to “Kite crest”')
    const migrated = describeAudit({ ...line('register-film', { name: 'Cast vinyl white', typed: 'Cast vinyl', polymer: 'PVC', retired: true, reason: 'It is PVC.' }), actor: null })
    expect(migrated.sentence).toBe('Someone retired Cast vinyl white when films moved to the polymer register: It is PVC.')
  })
})
