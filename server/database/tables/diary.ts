// The real-life alert diary: alerts and episodes logged by the household (or the trainer on their behalf), the
// trainer's reviews of alerts, and a client's own warning window when the trainer sets one.
import { index, integer, sqliteTable, text } from 'drizzle-orm/sqlite-core'
import { ALERT_CONFIDENCES, DIARY_KINDS, EPISODE_SEVERITIES } from '../../../shared/utils/diary'
import { clients, id, now, timestamps, users } from './core'

export const diaryEntries = sqliteTable('diary_entries', {
  id: id(),
  clientId: text('client_id').notNull().references(() => clients.id, { onDelete: 'cascade' }),
  kind: text('kind', { enum: DIARY_KINDS }).notNull(),
  // The alert's instant, or the episode's onset (first symptoms): UTC ms.
  occurredAt: integer('occurred_at', { mode: 'timestamp_ms' }).notNull(),
  // Alerts: what the dog did, where, how sure the handler was.
  behaviour: text('behaviour'),
  place: text('place'),
  confidence: text('confidence', { enum: ALERT_CONFIDENCES }),
  // Episodes: severity and what the person did.
  severity: text('severity', { enum: EPISODE_SEVERITIES }),
  action: text('action'),
  notes: text('notes'),
  createdById: text('created_by_id').references(() => users.id),
  // The trainer's review of an alert.
  reviewedAt: integer('reviewed_at', { mode: 'timestamp_ms' }),
  reviewedById: text('reviewed_by_id').references(() => users.id),
  reviewComment: text('review_comment'),
  ...timestamps,
}, t => [index('diary_entries_client_idx').on(t.clientId, t.occurredAt)])

/** A client's own warning window, set by the trainer; without a row the business policy for the condition applies. */
export const diaryWindows = sqliteTable('diary_windows', {
  clientId: text('client_id').primaryKey().references(() => clients.id, { onDelete: 'cascade' }),
  minMinutes: integer('min_minutes').notNull(),
  maxMinutes: integer('max_minutes').notNull(),
  updatedById: text('updated_by_id').references(() => users.id),
  updatedAt: integer('updated_at', { mode: 'timestamp_ms' }).notNull().default(now).$onUpdate(() => new Date()),
})
