// Dog profiles: the status history, health records and suitability assessments of each dog (the dogs table is in core).
import { index, sqliteTable, text } from 'drizzle-orm/sqlite-core'
import { DOG_STATUSES } from '../../../shared/utils/enums'
import { ASSESSMENT_OUTCOMES, HEALTH_RECORD_KINDS } from '../../../shared/utils/dogs'
import { dogs, id, timestamps, users } from './core'

/** The dog's status over time; dogs.status is the latest of these. */
export const dogStatusChanges = sqliteTable('dog_status_changes', {
  id: id(),
  dogId: text('dog_id').notNull().references(() => dogs.id, { onDelete: 'cascade' }),
  status: text('status', { enum: DOG_STATUSES }).notNull(),
  effectiveOn: text('effective_on').notNull(),
  note: text('note'),
  changedById: text('changed_by_id').references(() => users.id),
  createdAt: timestamps.createdAt,
}, t => [index('dog_status_changes_dog_idx').on(t.dogId, t.effectiveOn)])

export const dogHealthRecords = sqliteTable('dog_health_records', {
  id: id(),
  dogId: text('dog_id').notNull().references(() => dogs.id, { onDelete: 'cascade' }),
  kind: text('kind', { enum: HEALTH_RECORD_KINDS }).notNull(),
  name: text('name').notNull(),
  doneOn: text('done_on').notNull(),
  dueOn: text('due_on'),
  note: text('note'),
  createdById: text('created_by_id').references(() => users.id),
  ...timestamps,
}, t => [index('dog_health_records_dog_idx').on(t.dogId, t.dueOn)])

export const dogAssessments = sqliteTable('dog_assessments', {
  id: id(),
  dogId: text('dog_id').notNull().references(() => dogs.id, { onDelete: 'cascade' }),
  assessedOn: text('assessed_on').notNull(),
  assessorId: text('assessor_id').references(() => users.id),
  // { traitKey: 1..5 } for every trait in SUITABILITY_TRAITS (shared/utils/dogs.ts).
  scores: text('scores', { mode: 'json' }).$type<Record<string, number>>().notNull(),
  notes: text('notes'),
  outcome: text('outcome', { enum: ASSESSMENT_OUTCOMES }).notNull(),
  createdAt: timestamps.createdAt,
}, t => [index('dog_assessments_dog_idx').on(t.dogId, t.assessedOn)])
