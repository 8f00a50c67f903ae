import { integer, sqliteTable, text } from 'drizzle-orm/sqlite-core'
import { now, users } from './core'

/** Business-wide policies (sample rules, alert windows, …): one JSON value per key, defaults in shared/utils. */
export const businessSettings = sqliteTable('business_settings', {
  key: text('key').primaryKey(),
  value: text('value', { mode: 'json' }).$type<Record<string, unknown>>().notNull(),
  updatedById: text('updated_by_id').references(() => users.id),
  updatedAt: integer('updated_at', { mode: 'timestamp_ms' }).notNull().default(now).$onUpdate(() => new Date()),
})
