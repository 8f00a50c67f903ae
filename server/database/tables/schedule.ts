// The working day: appointments (single or in a repeating series), private calendar feeds, messages between a
// household and its trainer, and each person's reminder choices.
import { index, integer, primaryKey, sqliteTable, text, uniqueIndex } from 'drizzle-orm/sqlite-core'
import { APPOINTMENT_KINDS, APPOINTMENT_STATUSES } from '../../../shared/utils/schedule'
import { REMINDER_KINDS } from '../../../shared/utils/reminders'
import { clients, dogs, id, timestamps, users } from './core'
import { homeworkVideos } from './homework'

// A repeating series: its RFC 5545 rule (always with COUNT) and the wall time of its first visit. Each visit of the
// series is also a row of `appointments` (so a day's, a week's and a reminder's queries read one table); a moved
// visit keeps its `originalStartsAt` (the RECURRENCE-ID of the calendar feed), a cancelled one becomes an EXDATE.
export const appointmentSeries = sqliteTable('appointment_series', {
  id: id(),
  clientId: text('client_id').notNull().references(() => clients.id, { onDelete: 'cascade' }),
  rrule: text('rrule').notNull(),
  timeZone: text('time_zone').notNull(),
  // Raised on every change, for the feed's SEQUENCE (RFC 5545 3.8.7.4).
  sequence: integer('sequence').notNull().default(0),
  ...timestamps,
}, t => [index('appointment_series_client_idx').on(t.clientId)])

export const appointments = sqliteTable('appointments', {
  id: id(),
  seriesId: text('series_id').references(() => appointmentSeries.id, { onDelete: 'cascade' }),
  clientId: text('client_id').notNull().references(() => clients.id, { onDelete: 'cascade' }),
  // The trainer whose diary it fills (the client's trainer when booked).
  trainerId: text('trainer_id').notNull().references(() => users.id),
  dogId: text('dog_id').references(() => dogs.id, { onDelete: 'set null' }),
  kind: text('kind', { enum: APPOINTMENT_KINDS }).notNull(),
  startsAt: integer('starts_at', { mode: 'timestamp_ms' }).notNull(),
  // Where the visit was in the series' rule before any move (equal to startsAt for a visit never moved).
  originalStartsAt: integer('original_starts_at', { mode: 'timestamp_ms' }).notNull(),
  durationMinutes: integer('duration_minutes').notNull(),
  timeZone: text('time_zone').notNull(),
  place: text('place'),
  householdNotes: text('household_notes'),
  privateNotes: text('private_notes'),
  status: text('status', { enum: APPOINTMENT_STATUSES }).notNull().default('scheduled'),
  cancelReason: text('cancel_reason'),
  sequence: integer('sequence').notNull().default(0),
  createdById: text('created_by_id').references(() => users.id, { onDelete: 'set null' }),
  ...timestamps,
}, t => [
  index('appointments_trainer_idx').on(t.trainerId, t.startsAt),
  index('appointments_client_idx').on(t.clientId, t.startsAt),
  index('appointments_series_idx').on(t.seriesId, t.originalStartsAt),
  index('appointments_starts_idx').on(t.startsAt),
])

// One private feed per person. The URL holds `feedKey` and an HMAC of it made with the server's secret, so a copy of
// the database alone cannot make a working URL; renewing replaces the key and the old URL answers 404.
export const calendarFeeds = sqliteTable('calendar_feeds', {
  userId: text('user_id').primaryKey().references(() => users.id, { onDelete: 'cascade' }),
  feedKey: text('feed_key').notNull(),
  ...timestamps,
}, t => [uniqueIndex('calendar_feeds_key_unique').on(t.feedKey)])

// One conversation per household: every message belongs to a client.
export const messages = sqliteTable('messages', {
  id: id(),
  clientId: text('client_id').notNull().references(() => clients.id, { onDelete: 'cascade' }),
  authorId: text('author_id').references(() => users.id, { onDelete: 'set null' }),
  body: text('body').notNull(),
  // A reply about a homework video (shown with a link to it).
  homeworkVideoId: text('homework_video_id').references(() => homeworkVideos.id, { onDelete: 'set null' }),
  attachmentKey: text('attachment_key'),
  attachmentName: text('attachment_name'),
  attachmentType: text('attachment_type'),
  attachmentBytes: integer('attachment_bytes'),
  createdAt: timestamps.createdAt,
}, t => [index('messages_client_idx').on(t.clientId, t.createdAt)])

// Where each person has read a conversation up to.
export const messageReads = sqliteTable('message_reads', {
  clientId: text('client_id').notNull().references(() => clients.id, { onDelete: 'cascade' }),
  userId: text('user_id').notNull().references(() => users.id, { onDelete: 'cascade' }),
  readAt: integer('read_at', { mode: 'timestamp_ms' }).notNull(),
}, t => [primaryKey({ columns: [t.clientId, t.userId] }), index('message_reads_user_idx').on(t.userId)])

// When each person was last e-mailed "you have a new message" (at most once an hour while unread).
export const messageNotices = sqliteTable('message_notices', {
  userId: text('user_id').primaryKey().references(() => users.id, { onDelete: 'cascade' }),
  noticedAt: integer('noticed_at', { mode: 'timestamp_ms' }).notNull(),
})

// A person's own choice per reminder kind (no row: on, unless the office has switched the kind off).
export const reminderPreferences = sqliteTable('reminder_preferences', {
  userId: text('user_id').notNull().references(() => users.id, { onDelete: 'cascade' }),
  kind: text('kind', { enum: REMINDER_KINDS }).notNull(),
  enabled: integer('enabled', { mode: 'boolean' }).notNull(),
}, t => [primaryKey({ columns: [t.userId, t.kind] })])
