// Training: programme templates, each client's programme (its milestones and their sign-off), sessions and trials.
import { index, integer, real, sqliteTable, text, uniqueIndex } from 'drizzle-orm/sqlite-core'
import { TRAINING_STAGES } from '../../../shared/utils/enums'
import { SESSION_RUNNERS, type MilestoneTemplateItem, type ReadinessCriteria } from '../../../shared/utils/training'
import { clients, dogs, id, timestamps, users } from './core'

/** An ordered list of milestones the admin keeps; a client's programme is copied from one. */
export const programmeTemplates = sqliteTable('programme_templates', {
  id: id(),
  name: text('name').notNull(),
  isDefault: integer('is_default', { mode: 'boolean' }).notNull().default(false),
  milestones: text('milestones', { mode: 'json' }).$type<MilestoneTemplateItem[]>().notNull(),
  // Archived: offered for no new programme; clients already on it keep their programme and fees.
  archivedAt: integer('archived_at', { mode: 'timestamp_ms' }),
  ...timestamps,
})

/** One milestone of a client's programme. `criteria` null on a measured milestone means the business's defaults. */
export const clientMilestones = sqliteTable('client_milestones', {
  id: id(),
  clientId: text('client_id').notNull().references(() => clients.id, { onDelete: 'cascade' }),
  position: integer('position').notNull(),
  name: text('name').notNull(),
  handlerText: text('handler_text').notNull(),
  measured: integer('measured', { mode: 'boolean' }).notNull().default(false),
  criteria: text('criteria', { mode: 'json' }).$type<ReadinessCriteria>(),
  confirmedAt: integer('confirmed_at', { mode: 'timestamp_ms' }),
  confirmedById: text('confirmed_by_id').references(() => users.id, { onDelete: 'set null' }),
  // Written when the trainer signs off with criteria unmet.
  confirmReason: text('confirm_reason'),
  ...timestamps,
}, t => [uniqueIndex('client_milestones_position_unique').on(t.clientId, t.position)])

/** A training session: who ran it, when and where, at what stage, blind or not. */
export const trainingSessions = sqliteTable('training_sessions', {
  id: id(),
  clientId: text('client_id').notNull().references(() => clients.id, { onDelete: 'cascade' }),
  dogId: text('dog_id').notNull().references(() => dogs.id, { onDelete: 'cascade' }),
  runBy: text('run_by', { enum: SESSION_RUNNERS }).notNull(),
  runById: text('run_by_id').references(() => users.id, { onDelete: 'set null' }),
  day: text('day').notNull(),
  place: text('place'),
  stage: text('stage', { enum: TRAINING_STAGES }).notNull(),
  conditions: text('conditions'),
  notes: text('notes'),
  blind: integer('blind', { mode: 'boolean' }).notNull().default(false),
  ...timestamps,
}, t => [index('training_sessions_client_idx').on(t.clientId, t.day)])

/** One trial of a session: the stations, which held the target (null: blank), which the dog indicated (null: none). */
export const trainingTrials = sqliteTable('training_trials', {
  id: id(),
  sessionId: text('session_id').notNull().references(() => trainingSessions.id, { onDelete: 'cascade' }),
  clientId: text('client_id').notNull().references(() => clients.id, { onDelete: 'cascade' }),
  stations: integer('stations').notNull(),
  targetStation: integer('target_station'),
  indicatedStation: integer('indicated_station'),
  latencySeconds: real('latency_seconds'),
  notes: text('notes'),
  // A key the device makes up when the trial is tapped, so a trial sent again (retry queue, reload) is stored once.
  entryKey: text('entry_key'),
  ...timestamps,
}, t => [
  index('training_trials_session_idx').on(t.sessionId), index('training_trials_client_idx').on(t.clientId),
  uniqueIndex('training_trials_entry_key_unique').on(t.sessionId, t.entryKey),
])
