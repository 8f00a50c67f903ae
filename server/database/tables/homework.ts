// Homework: reusable exercises, assignments set for a household, resumable video uploads in progress, the videos
// handed in, and the trainer's review of each video with comments pinned to a time in it.
import { index, integer, real, sqliteTable, text } from 'drizzle-orm/sqlite-core'
import { clients, dogs, id, timestamps, users } from './core'
import { clientMilestones } from './training'

export const HOMEWORK_ASSIGNMENT_STATES = ['open', 'done', 'cancelled'] as const
export const HOMEWORK_REVIEW_OUTCOMES = ['approved', 'try_again'] as const

/** A common exercise the business reuses when setting homework (the trainer's own library). */
export const homeworkExercises = sqliteTable('homework_exercises', {
  id: id(),
  title: text('title').notNull(),
  instructions: text('instructions').notNull(),
  expectedVideos: integer('expected_videos').notNull().default(1),
  createdById: text('created_by_id').references(() => users.id, { onDelete: 'set null' }),
  archivedAt: integer('archived_at', { mode: 'timestamp_ms' }),
  ...timestamps,
})

/** Homework set for one household: what to do, by when, how many videos are expected. */
export const homeworkAssignments = sqliteTable('homework_assignments', {
  id: id(),
  clientId: text('client_id').notNull().references(() => clients.id, { onDelete: 'cascade' }),
  dogId: text('dog_id').references(() => dogs.id, { onDelete: 'set null' }),
  milestoneId: text('milestone_id').references(() => clientMilestones.id, { onDelete: 'set null' }),
  exerciseId: text('exercise_id').references(() => homeworkExercises.id, { onDelete: 'set null' }),
  title: text('title').notNull(),
  instructions: text('instructions').notNull(),
  /** YYYY-MM-DD in the business's time zone. */
  dueDay: text('due_day').notNull(),
  expectedVideos: integer('expected_videos').notNull().default(1),
  state: text('state', { enum: HOMEWORK_ASSIGNMENT_STATES }).notNull().default('open'),
  setById: text('set_by_id').references(() => users.id, { onDelete: 'set null' }),
  ...timestamps,
}, t => [index('homework_assignments_client_idx').on(t.clientId, t.state, t.dueDay)])

/**
 * A resumable (tus) upload in progress. The row is the server's proof of who started it and for which assignment:
 * an upload id without a row is refused. Deleted when the upload finishes (a video row takes its place) or expires.
 */
export const homeworkUploads = sqliteTable('homework_uploads', {
  /** The tus upload id (also the staging file's name). */
  id: text('id').primaryKey(),
  assignmentId: text('assignment_id').notNull().references(() => homeworkAssignments.id, { onDelete: 'cascade' }),
  clientId: text('client_id').notNull().references(() => clients.id, { onDelete: 'cascade' }),
  uploadedById: text('uploaded_by_id').notNull().references(() => users.id, { onDelete: 'cascade' }),
  fileName: text('file_name').notNull(),
  declaredSize: integer('declared_size').notNull(),
  expiresAt: integer('expires_at', { mode: 'timestamp_ms' }).notNull(),
  ...timestamps,
}, t => [index('homework_uploads_expires_idx').on(t.expiresAt)])

/** A video handed in for an assignment: stored whole (never half-uploaded), then reviewed by the trainer. */
export const homeworkVideos = sqliteTable('homework_videos', {
  id: id(),
  assignmentId: text('assignment_id').notNull().references(() => homeworkAssignments.id, { onDelete: 'cascade' }),
  clientId: text('client_id').notNull().references(() => clients.id, { onDelete: 'cascade' }),
  uploadedById: text('uploaded_by_id').references(() => users.id, { onDelete: 'set null' }),
  fileName: text('file_name').notNull(),
  /** From the bytes: video/mp4, video/quicktime or video/webm. */
  contentType: text('content_type').notNull(),
  size: integer('size').notNull(),
  storageKey: text('storage_key').notNull(),
  /** Read from the container at upload; null when it could not be read. */
  durationSeconds: real('duration_seconds'),
  note: text('note'),
  reviewOutcome: text('review_outcome', { enum: HOMEWORK_REVIEW_OUTCOMES }),
  reviewNotes: text('review_notes'),
  reviewedAt: integer('reviewed_at', { mode: 'timestamp_ms' }),
  reviewedById: text('reviewed_by_id').references(() => users.id, { onDelete: 'set null' }),
  nextAssignmentId: text('next_assignment_id').references(() => homeworkAssignments.id, { onDelete: 'set null' }),
  ...timestamps,
}, t => [
  index('homework_videos_assignment_idx').on(t.assignmentId),
  index('homework_videos_review_idx').on(t.clientId, t.reviewedAt, t.createdAt),
])

/** A trainer's comment pinned to a moment of a video. */
export const homeworkComments = sqliteTable('homework_comments', {
  id: id(),
  videoId: text('video_id').notNull().references(() => homeworkVideos.id, { onDelete: 'cascade' }),
  authorId: text('author_id').references(() => users.id, { onDelete: 'set null' }),
  atSeconds: real('at_seconds').notNull(),
  body: text('body').notNull(),
  ...timestamps,
}, t => [index('homework_comments_video_idx').on(t.videoId, t.atSeconds)])
