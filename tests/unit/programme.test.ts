import { describe, expect, it } from 'vitest'
import { stageProgress, STAGE_STEPS } from '../../shared/utils/programme'

describe('stageProgress', () => {
  it('places each open stage in order and treats a closed file apart', () => {
    expect(STAGE_STEPS.map(s => s.status)).toEqual(['intake', 'active', 'placed', 'aftercare'])
    expect(stageProgress('intake')).toMatchObject({ index: 0, total: 4, label: 'Intake' })
    expect(stageProgress('placed')).toMatchObject({ index: 2, label: 'Placed' })
    expect(stageProgress('closed')).toMatchObject({ index: -1, label: 'Closed' })
  })
})
