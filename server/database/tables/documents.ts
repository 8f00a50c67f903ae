import { index, integer, sqliteTable, text } from 'drizzle-orm/sqlite-core'
import { DOCUMENT_KINDS } from '../../../shared/utils/documents'
import { clients, dogs, id, now, timestamps, users } from './core'

// Files kept on a client file (clinician's letters, consent, vaccination records…). The bytes live in file storage
// (server/utils/storage.ts) under `storageKey`; this row is the only way to reach them.
export const documents = sqliteTable('documents', {
  id: id(),
  clientId: text('client_id').notNull().references(() => clients.id, { onDelete: 'cascade' }),
  kind: text('kind', { enum: DOCUMENT_KINDS }).notNull(),
  title: text('title').notNull(),
  originalName: text('original_name').notNull(),
  // Decided from the file's bytes, never from its name or the browser's claim.
  contentType: text('content_type').notNull(),
  sizeBytes: integer('size_bytes').notNull(),
  storageKey: text('storage_key').notNull(),
  uploadedById: text('uploaded_by_id').references(() => users.id, { onDelete: 'set null' }),
  ...timestamps,
}, t => [index('documents_client_idx').on(t.clientId, t.createdAt)])

// One photo per dog; replacing it writes a new file and removes the old one.
export const dogPhotos = sqliteTable('dog_photos', {
  dogId: text('dog_id').primaryKey().references(() => dogs.id, { onDelete: 'cascade' }),
  storageKey: text('storage_key').notNull(),
  contentType: text('content_type').notNull(),
  sizeBytes: integer('size_bytes').notNull(),
  updatedAt: integer('updated_at', { mode: 'timestamp_ms' }).notNull().default(now).$onUpdate(() => new Date()),
})
