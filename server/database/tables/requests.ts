// Request keys: the id a phone makes for each record it sends, so a send repeated after a lost answer (no signal,
// a crash, a reload) is answered with the first result instead of making the record twice.
import { index, integer, sqliteTable, text } from 'drizzle-orm/sqlite-core'
import { REQUEST_KEY_STATES } from '../../../shared/utils/request-keys'
import { users } from './core'

export const requestKeys = sqliteTable('request_keys', {
  key: text('key').primaryKey(),
  userId: text('user_id').notNull().references(() => users.id, { onDelete: 'cascade' }),
  method: text('method').notNull(),
  path: text('path').notNull(),
  /** SHA-256 of a JSON body, so the same key with other content is refused rather than answered wrongly. */
  bodyHash: text('body_hash'),
  /** pending: being handled; applied: its transaction committed (answer not stored yet); done: answer stored. */
  state: text('state', { enum: REQUEST_KEY_STATES }).notNull(),
  statusCode: integer('status_code'),
  response: text('response'),
  /** When the person tapped on the phone (X-Tapped-At), beside when the server received it. */
  tappedAt: integer('tapped_at', { mode: 'timestamp_ms' }),
  receivedAt: integer('received_at', { mode: 'timestamp_ms' }).notNull(),
  completedAt: integer('completed_at', { mode: 'timestamp_ms' }),
}, t => [index('request_keys_user_idx').on(t.userId, t.receivedAt)])
