// Records made on a phone in the field, often with no signal (docs/offline.md).
import { index, integer, sqliteTable, text } from 'drizzle-orm/sqlite-core'
import { clients, id, now, timestamps, users } from './core'
import { homeworkAssignments } from './homework'

/**
 * A bag-code prefix reserved for one phone (shared/utils/bag-codes.ts): only that phone makes codes with it, so codes
 * made on phones with no signal never clash. Held by the person who reserved it, for the record only.
 */
export const bagCodePrefixes = sqliteTable('bag_code_prefixes', {
  prefix: text('prefix').primaryKey(),
  reservedById: text('reserved_by_id').references(() => users.id, { onDelete: 'set null' }),
  createdAt: integer('created_at', { mode: 'timestamp_ms' }).notNull().default(now),
}, t => [index('bag_code_prefixes_user_idx').on(t.reservedById)])

/** A few words about one practice of a homework, written on the phone after practising (the trainer reads them). */
export const homeworkNotes = sqliteTable('homework_notes', {
  id: id(),
  assignmentId: text('assignment_id').notNull().references(() => homeworkAssignments.id, { onDelete: 'cascade' }),
  clientId: text('client_id').notNull().references(() => clients.id, { onDelete: 'cascade' }),
  authorId: text('author_id').references(() => users.id, { onDelete: 'set null' }),
  /** When the practice happened (the moment of the tap on the phone unless given). */
  practisedAt: integer('practised_at', { mode: 'timestamp_ms' }).notNull(),
  body: text('body').notNull(),
  ...timestamps,
}, t => [index('homework_notes_assignment_idx').on(t.assignmentId, t.practisedAt)])
