import { index, integer, sqliteTable, text } from 'drizzle-orm/sqlite-core'
import { id, timestamps, users } from './core'

// One-time recovery codes for a second factor: only their SHA-256 is stored; each works once.
export const recoveryCodes = sqliteTable('recovery_codes', {
  id: id(),
  userId: text('user_id').notNull().references(() => users.id, { onDelete: 'cascade' }),
  codeHash: text('code_hash').notNull(),
  usedAt: integer('used_at', { mode: 'timestamp_ms' }),
  createdAt: timestamps.createdAt,
}, t => [index('recovery_codes_user_idx').on(t.userId)])
