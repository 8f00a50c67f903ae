// The scent-sample bank: freezer containers, outer (freezer) bags, samples (one small bag each) and their uses.
// Saliva samples are biological material; the rules they follow are in shared/utils/samples.ts.
import { index, integer, sqliteTable, text, uniqueIndex } from 'drizzle-orm/sqlite-core'
import { SAMPLE_KINDS } from '../../../shared/utils/samples'
import { clients, id, now, timestamps, users } from './core'

/** A lidded jar or tub in the freezer; holds outer bags of one kind only. */
export const sampleContainers = sqliteTable('sample_containers', {
  id: id(),
  clientId: text('client_id').notNull().references(() => clients.id, { onDelete: 'cascade' }),
  kind: text('kind', { enum: SAMPLE_KINDS }).notNull(),
  label: text('label').notNull(),
  createdById: text('created_by_id').references(() => users.id, { onDelete: 'set null' }),
  ...timestamps,
}, t => [index('sample_containers_client_idx').on(t.clientId)])

/** A larger freezer bag holding up to maxBagsPerOuterBag small bags of one kind. */
export const sampleOuterBags = sqliteTable('sample_outer_bags', {
  id: id(),
  clientId: text('client_id').notNull().references(() => clients.id, { onDelete: 'cascade' }),
  kind: text('kind', { enum: SAMPLE_KINDS }).notNull(),
  label: text('label').notNull(),
  containerId: text('container_id').references(() => sampleContainers.id, { onDelete: 'set null' }),
  ...timestamps,
}, t => [index('sample_outer_bags_client_idx').on(t.clientId), index('sample_outer_bags_container_idx').on(t.containerId)])

/**
 * One collection: the saliva-soaked rolls in one small bag, with the hand-written bag code.
 * `answersCompletedAt` is null while a quick-saved collection still waits for its checklist answers.
 */
export const samples = sqliteTable('samples', {
  id: id(),
  clientId: text('client_id').notNull().references(() => clients.id, { onDelete: 'cascade' }),
  kind: text('kind', { enum: SAMPLE_KINDS }).notNull(),
  bagCode: text('bag_code').notNull(),
  collectedAt: integer('collected_at', { mode: 'timestamp_ms' }).notNull(),
  firstSymptomsAt: integer('first_symptoms_at', { mode: 'timestamp_ms' }),
  // Targets: medication for this episode taken before collecting (null: not recorded).
  medicationBefore: integer('medication_before', { mode: 'boolean' }),
  collectorId: text('collector_id').references(() => users.id, { onDelete: 'set null' }),
  rolls: integer('rolls').notNull(),
  // The pre-collection answers as given (ISO times, null for "not in that time", the list of unknowns).
  answers: text('answers', { mode: 'json' }).$type<Record<string, unknown>>(),
  answersCompletedAt: integer('answers_completed_at', { mode: 'timestamp_ms' }),
  compromised: integer('compromised', { mode: 'boolean' }).notNull().default(false),
  // The protocol rules broken, as { rule, message } from checkCollection.
  compromisedReasons: text('compromised_reasons', { mode: 'json' }).$type<{ rule: string, message: string }[]>(),
  overrideReason: text('override_reason'),
  overrideById: text('override_by_id').references(() => users.id, { onDelete: 'set null' }),
  outerBagId: text('outer_bag_id').references(() => sampleOuterBags.id, { onDelete: 'set null' }),
  discardedAt: integer('discarded_at', { mode: 'timestamp_ms' }),
  discardReason: text('discard_reason'),
  notes: text('notes'),
  ...timestamps,
}, t => [
  uniqueIndex('samples_client_code_unique').on(t.clientId, t.bagCode),
  index('samples_client_idx').on(t.clientId, t.collectedAt),
  index('samples_outer_bag_idx').on(t.outerBagId),
])

/** A sample out of the freezer for training: opened when it comes out, closed when it goes back (or is thrown away). */
export const sampleUses = sqliteTable('sample_uses', {
  id: id(),
  sampleId: text('sample_id').notNull().references(() => samples.id, { onDelete: 'cascade' }),
  clientId: text('client_id').notNull().references(() => clients.id, { onDelete: 'cascade' }),
  outAt: integer('out_at', { mode: 'timestamp_ms' }).notNull(),
  backAt: integer('back_at', { mode: 'timestamp_ms' }),
  discarded: integer('discarded', { mode: 'boolean' }).notNull().default(false),
  stage: text('stage').notNull(),
  // A free reference to the training session (sessions get their own records later).
  sessionRef: text('session_ref'),
  overLimit: integer('over_limit', { mode: 'boolean' }).notNull().default(false),
  recordedById: text('recorded_by_id').references(() => users.id, { onDelete: 'set null' }),
  ...timestamps,
}, t => [index('sample_uses_sample_idx').on(t.sampleId, t.outAt), index('sample_uses_client_idx').on(t.clientId, t.outAt)])

/**
 * Each household's stock summary, recomputed when samples or uses change and by the periodic check: what the roster
 * reads (one query per page) and where a low-stock episode is remembered, so its reminder goes out once.
 */
export const sampleBankStatus = sqliteTable('sample_bank_status', {
  clientId: text('client_id').primaryKey().references(() => clients.id, { onDelete: 'cascade' }),
  summary: text('summary', { mode: 'json' }).$type<Record<string, unknown>>().notNull(),
  restockDue: integer('restock_due', { mode: 'boolean' }).notNull().default(false),
  // Counts low-stock episodes; the reminder's dedupe key names the episode.
  restockEpisode: integer('restock_episode').notNull().default(0),
  restockDueSince: integer('restock_due_since', { mode: 'timestamp_ms' }),
  reminderQueuedAt: integer('reminder_queued_at', { mode: 'timestamp_ms' }),
  checkedAt: integer('checked_at', { mode: 'timestamp_ms' }).notNull().default(now),
}, t => [index('sample_bank_status_checked_idx').on(t.checkedAt)])

/** Per household: the trainer's choice to keep flagged targets (late or after medication, see targetTiming) out of training. */
export const sampleBankSettings = sqliteTable('sample_bank_settings', {
  clientId: text('client_id').primaryKey().references(() => clients.id, { onDelete: 'cascade' }),
  excludeFlaggedTargets: integer('exclude_flagged_targets', { mode: 'boolean' }).notNull().default(false),
  updatedById: text('updated_by_id').references(() => users.id, { onDelete: 'set null' }),
  ...timestamps,
})
