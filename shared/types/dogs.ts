import type { dogAssessments, dogHealthRecords, dogStatusChanges } from '../../server/database/schema'
import type { AssessmentOutcome, AssessmentSummary, DogSex, DogSource, DogStatus, HealthRecordLike, HealthRecordState } from '../utils/dogs'

export type DogStatusChangeRow = typeof dogStatusChanges.$inferSelect
export type DogHealthRecordRow = typeof dogHealthRecords.$inferSelect
export type DogAssessmentRow = typeof dogAssessments.$inferSelect

// The shapes the dog-profile API returns, as the pages receive them (dates as JSON strings).
export interface DogView {
  id: string
  clientId: string
  name: string
  breed: string | null
  sex: DogSex | null
  dateOfBirth: string | null
  microchip: string | null
  source: DogSource | null
  status: DogStatus
  acceptedOn: string | null
  notes: string | null
}

export interface DogStatusChangeView {
  id: string
  status: DogStatus
  effectiveOn: string
  note: string | null
  changedByName: string | null
}

/** A health record with its due state (see healthRecordStates). */
export type DogHealthRecordView = HealthRecordLike & HealthRecordState & { note: string | null }

export interface DogAssessmentView {
  id: string
  assessedOn: string
  scores: Record<string, number>
  notes: string | null
  outcome: AssessmentOutcome
  assessorName: string | null
  summary: AssessmentSummary
}
