import { sql } from 'drizzle-orm'
import { index, integer, primaryKey, sqliteTable, text, uniqueIndex } from 'drizzle-orm/sqlite-core'
import { CONDITIONS, DOG_SEXES, DOG_SOURCES, DOG_STATUSES, HANDLER_RELATIONSHIPS, CLIENT_STATUSES, ROLES } from '../../../shared/utils/enums'

// All times are stored as UTC milliseconds since the epoch and shown in the viewer's time zone.
export const now = sql`(cast(unixepoch('subsec') * 1000 as integer))`
export const timestamps = {
  createdAt: integer('created_at', { mode: 'timestamp_ms' }).notNull().default(now),
  updatedAt: integer('updated_at', { mode: 'timestamp_ms' }).notNull().default(now).$onUpdate(() => new Date()),
}
export const id = () => text('id').primaryKey().$defaultFn(() => crypto.randomUUID())

export const users = sqliteTable('users', {
  id: id(),
  email: text('email').notNull(),
  name: text('name').notNull(),
  role: text('role', { enum: ROLES }).notNull(),
  passwordHash: text('password_hash'),
  phone: text('phone'),
  timeZone: text('time_zone').notNull().default('Europe/London'),
  disabledAt: integer('disabled_at', { mode: 'timestamp_ms' }),
  // Raised on sign-out, password change and disabling: every older sealed cookie stops working.
  sessionVersion: integer('session_version').notNull().default(0),
  lastSignInAt: integer('last_sign_in_at', { mode: 'timestamp_ms' }),
  // Second factor (TOTP, RFC 6238): the secret sealed with the server's key (never in clear), set once confirmed;
  // a secret being enrolled waits in totpPendingSecret until the person proves it with a code.
  totpSecret: text('totp_secret'),
  totpPendingSecret: text('totp_pending_secret'),
  totpEnabledAt: integer('totp_enabled_at', { mode: 'timestamp_ms' }),
  // The last time step accepted, so one code is never accepted twice (RFC 6238 section 5.2).
  totpLastStep: integer('totp_last_step'),
  ...timestamps,
}, t => [uniqueIndex('users_email_unique').on(t.email)])

export const clients = sqliteTable('clients', {
  id: id(),
  trainerId: text('trainer_id').notNull().references(() => users.id),
  householdName: text('household_name').notNull(),
  personName: text('person_name').notNull(),
  email: text('email'),
  phone: text('phone'),
  addressLine: text('address_line'),
  town: text('town'),
  postcode: text('postcode'),
  // Who invoices are addressed to; each empty field falls back to the contact (person, address) above.
  billingName: text('billing_name'),
  billingAddressLine: text('billing_address_line'),
  billingTown: text('billing_town'),
  billingPostcode: text('billing_postcode'),
  billingCountry: text('billing_country'),
  condition: text('condition', { enum: CONDITIONS }).notNull(),
  conditionDetail: text('condition_detail'),
  clinicianName: text('clinician_name'),
  clinicianContact: text('clinician_contact'),
  earlySigns: text('early_signs'),
  episodeFrequency: text('episode_frequency'),
  usualOnset: text('usual_onset'),
  status: text('status', { enum: CLIENT_STATUSES }).notNull().default('intake'),
  programmeStartedOn: text('programme_started_on'),
  // The programme template the client's programme was started from (kept when the template is archived).
  programmeTemplateId: text('programme_template_id'),
  notes: text('notes'),
  ...timestamps,
}, t => [
  index('clients_trainer_idx').on(t.trainerId),
  index('clients_household_idx').on(t.householdName),
])

export const clientHandlers = sqliteTable('client_handlers', {
  clientId: text('client_id').notNull().references(() => clients.id, { onDelete: 'cascade' }),
  userId: text('user_id').notNull().references(() => users.id, { onDelete: 'cascade' }),
  relationship: text('relationship', { enum: HANDLER_RELATIONSHIPS }).notNull().default('self'),
  createdAt: timestamps.createdAt,
}, t => [primaryKey({ columns: [t.clientId, t.userId] }), index('client_handlers_user_idx').on(t.userId)])

export const dogs = sqliteTable('dogs', {
  id: id(),
  clientId: text('client_id').notNull().references(() => clients.id, { onDelete: 'cascade' }),
  name: text('name').notNull(),
  breed: text('breed'),
  sex: text('sex', { enum: DOG_SEXES }),
  dateOfBirth: text('date_of_birth'),
  microchip: text('microchip'),
  source: text('source', { enum: DOG_SOURCES }),
  status: text('status', { enum: DOG_STATUSES }).notNull().default('assessment'),
  // The first day an assessment with the outcome 'accept' was recorded: the dog's acceptance into the programme.
  acceptedOn: text('accepted_on'),
  notes: text('notes'),
  ...timestamps,
}, t => [
  index('dogs_client_idx').on(t.clientId),
  // A microchip names one animal (ISO 11784): two dogs with the same number is a typing mistake.
  uniqueIndex('dogs_microchip_unique').on(t.microchip),
])

export const invitations = sqliteTable('invitations', {
  id: id(),
  tokenHash: text('token_hash').notNull(),
  email: text('email').notNull(),
  name: text('name').notNull(),
  role: text('role', { enum: ROLES }).notNull(),
  clientId: text('client_id').references(() => clients.id, { onDelete: 'cascade' }),
  relationship: text('relationship', { enum: HANDLER_RELATIONSHIPS }),
  invitedById: text('invited_by_id').notNull().references(() => users.id),
  expiresAt: integer('expires_at', { mode: 'timestamp_ms' }).notNull(),
  acceptedAt: integer('accepted_at', { mode: 'timestamp_ms' }),
  revokedAt: integer('revoked_at', { mode: 'timestamp_ms' }),
  createdAt: timestamps.createdAt,
}, t => [uniqueIndex('invitations_token_unique').on(t.tokenHash)])

export const passwordResets = sqliteTable('password_resets', {
  id: id(),
  userId: text('user_id').notNull().references(() => users.id, { onDelete: 'cascade' }),
  tokenHash: text('token_hash').notNull(),
  expiresAt: integer('expires_at', { mode: 'timestamp_ms' }).notNull(),
  usedAt: integer('used_at', { mode: 'timestamp_ms' }),
  // Set when a newer reset link is asked for: only the latest link works.
  revokedAt: integer('revoked_at', { mode: 'timestamp_ms' }),
  createdAt: timestamps.createdAt,
}, t => [uniqueIndex('password_resets_token_unique').on(t.tokenHash)])

export const auditLog = sqliteTable('audit_log', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  actorId: text('actor_id').references(() => users.id),
  action: text('action').notNull(),
  entityType: text('entity_type').notNull(),
  entityId: text('entity_id'),
  clientId: text('client_id').references(() => clients.id, { onDelete: 'cascade' }),
  data: text('data', { mode: 'json' }).$type<Record<string, unknown>>(),
  createdAt: timestamps.createdAt,
}, t => [index('audit_client_idx').on(t.clientId, t.createdAt)])

export const outbox = sqliteTable('outbox', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  toAddress: text('to_address').notNull(),
  subject: text('subject').notNull(),
  textBody: text('text_body').notNull(),
  htmlBody: text('html_body'),
  // A message with a key is written at most once (reminders, notices that must not repeat).
  dedupeKey: text('dedupe_key'),
  // Attachments by reference ([{ kind: 'invoice-pdf', id }]), rendered when the message is sent (server/services/outbox.ts).
  attachments: text('attachments', { mode: 'json' }).$type<Array<{ kind: 'invoice-pdf' | 'receipt-pdf' | 'appointment-ics', id: string }>>(),
  // A single-use link by reference ({ kind: 'password-reset' | 'invitation', id }): its token is minted when the
  // message is sent and only its hash is stored, so the outbox never holds a usable link.
  secretLink: text('secret_link', { mode: 'json' }).$type<{ kind: 'password-reset' | 'invitation', id: string }>(),
  status: text('status', { enum: ['pending', 'sent', 'failed'] }).notNull().default('pending'),
  attempts: integer('attempts').notNull().default(0),
  nextAttemptAt: integer('next_attempt_at', { mode: 'timestamp_ms' }).notNull().default(now),
  lastError: text('last_error'),
  sentAt: integer('sent_at', { mode: 'timestamp_ms' }),
  createdAt: timestamps.createdAt,
}, t => [uniqueIndex('outbox_dedupe_unique').on(t.dedupeKey), index('outbox_due_idx').on(t.status, t.nextAttemptAt)])
