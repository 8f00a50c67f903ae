// Homework, the assignments half: the exercise library, assignments set for a household (from an exercise or from
// scratch), what the household sees, and the roster's "Homework to review" column. Pure rules live in
// shared/utils/homework.ts; the review half is in homework-review.ts; uploads and video files in the upload code.
import type { H3Event } from 'h3'
import { and, asc, count, eq, inArray, isNull, min, sql } from 'drizzle-orm'
import { clientMilestones, clients, dogs, homeworkAssignments, homeworkComments, homeworkExercises, homeworkVideos, users } from '../database/schema'
import type { AssignmentCreateInput, AssignmentUpdateInput, ExerciseInput } from '../../shared/schemas/homework'
import { businessProfile, businessProfileSchema } from '../../shared/schemas/settings-business'
import { HOMEWORK_UPLOAD_POLICY_DEFAULTS, HOMEWORK_UPLOAD_POLICY_KEY, homeworkUploadPolicySchema } from '../../shared/schemas/settings-homework'
import { megabytesToBytes } from '../../shared/utils/homework-video'
import { assignmentCompletion, assignmentDue, compareAssignments, dayInZone, dueDayLabel, dueDayProblem, reviewState } from '../../shared/utils/homework'
import type { AuthUser } from '../utils/authz'
import type { DbOrTx, Tx } from '../utils/db'

type ClientRow = typeof clients.$inferSelect
type AssignmentRow = typeof homeworkAssignments.$inferSelect
type ExerciseRow = typeof homeworkExercises.$inferSelect

export function homeworkRuleError(status: 409 | 422, message: string, fieldErrors?: Record<string, string>): never {
  throw createError({ statusCode: status, statusMessage: status === 409 ? 'Conflict' : 'Unprocessable Content', message, data: fieldErrors ? { fieldErrors } : undefined })
}

/** Today in the business's time zone: due days are calendar days of the business. */
export async function homeworkToday(db: DbOrTx = useDb(), now = new Date()): Promise<string> {
  const business = await readSetting('business', businessProfileSchema, businessProfile.defaults, db)
  return dayInZone(business.timeZone, now)
}

// ---------------------------------------------------------------------------------------------------------------
// Access (404 for "does not exist" and "not yours")

function staffOnly(user: AuthUser, message: string) {
  if (user.role === 'handler') throw createError({ statusCode: 403, statusMessage: 'Forbidden', message })
}

export async function requireHomeworkAssignmentAccess(event: H3Event, assignmentId: string, opts: { staff?: boolean } = {}) {
  const user = requireUser(event)
  const [row] = await useDb().select({ assignment: homeworkAssignments, client: clients }).from(homeworkAssignments)
    .innerJoin(clients, eq(clients.id, homeworkAssignments.clientId))
    .where(and(eq(homeworkAssignments.id, assignmentId), clientScope(user))).limit(1)
  if (!row) notFound('homework')
  if (opts.staff) staffOnly(user, 'Only the trainer can change homework.')
  return { user, assignment: row.assignment, client: row.client }
}

export async function requireHomeworkExerciseAccess(event: H3Event, exerciseId: string) {
  const user = requireRole(event, 'trainer', 'admin')
  const [exercise] = await useDb().select().from(homeworkExercises).where(eq(homeworkExercises.id, exerciseId)).limit(1)
  if (!exercise) notFound('exercise')
  // The library is the business's: every trainer uses it; the one who wrote an exercise and the office change it.
  if (user.role !== 'admin' && exercise.createdById !== user.id) {
    throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: 'Only the trainer who wrote this exercise, or the office, can change it. Copy it into a new one instead.' })
  }
  return { user, exercise }
}

// ---------------------------------------------------------------------------------------------------------------
// The exercise library

export async function listHomeworkExercises(opts: { includeArchived?: boolean } = {}) {
  const rows = await useDb().select({ exercise: homeworkExercises, createdByName: users.name }).from(homeworkExercises)
    .leftJoin(users, eq(users.id, homeworkExercises.createdById))
    .where(opts.includeArchived ? undefined : isNull(homeworkExercises.archivedAt))
    .orderBy(asc(homeworkExercises.title))
  return rows.map(r => ({ ...r.exercise, createdByName: r.createdByName }))
}

export async function createHomeworkExercise(user: AuthUser, input: ExerciseInput) {
  return useDb().transaction(async (tx) => {
    const [row] = await tx.insert(homeworkExercises).values({ ...input, createdById: user.id }).returning()
    await logAudit(tx, { actorId: user.id, action: 'homework-exercise.created', entityType: 'homework_exercise', entityId: row!.id, data: { title: row!.title } })
    return row!
  })
}

export async function updateHomeworkExercise(user: AuthUser, exercise: ExerciseRow, input: Partial<ExerciseInput>) {
  if (exercise.archivedAt) homeworkRuleError(409, 'This exercise is archived. Restore it before changing it.')
  return useDb().transaction(async (tx) => {
    const [row] = await tx.update(homeworkExercises).set({ ...input, updatedAt: new Date() }).where(eq(homeworkExercises.id, exercise.id)).returning()
    await logAudit(tx, { actorId: user.id, action: 'homework-exercise.updated', entityType: 'homework_exercise', entityId: exercise.id, data: { title: row!.title, fields: Object.keys(input) } })
    return row!
  })
}

/** Archiving keeps assignments made from it intact (they hold their own copy of the text). */
export async function archiveHomeworkExercise(user: AuthUser, exercise: ExerciseRow) {
  return useDb().transaction(async (tx) => {
    const [row] = await tx.update(homeworkExercises).set({ archivedAt: exercise.archivedAt ?? new Date(), updatedAt: new Date() }).where(eq(homeworkExercises.id, exercise.id)).returning()
    await logAudit(tx, { actorId: user.id, action: 'homework-exercise.archived', entityType: 'homework_exercise', entityId: exercise.id, data: { title: exercise.title } })
    return row!
  })
}

// ---------------------------------------------------------------------------------------------------------------
// Assignments

/** Checks an assignment's links and due day against the database; answers 422 with the field to fix. */
export async function resolveHomeworkAssignment(db: DbOrTx, client: ClientRow, input: AssignmentCreateInput, today: string) {
  const problem = dueDayProblem(input.dueDay, today)
  if (problem) homeworkRuleError(422, problem, { dueDay: problem })
  let exercise: ExerciseRow | null = null
  if (input.exerciseId) {
    const [row] = await db.select().from(homeworkExercises).where(and(eq(homeworkExercises.id, input.exerciseId), isNull(homeworkExercises.archivedAt))).limit(1)
    if (!row) homeworkRuleError(422, 'Choose an exercise from the library.', { exerciseId: 'Choose an exercise from the library (this one does not exist or was archived).' })
    exercise = row
  }
  if (input.milestoneId) await requireOwnMilestone(db, client, input.milestoneId)
  const [dog] = await db.select({ id: dogs.id }).from(dogs)
    .where(and(eq(dogs.clientId, client.id), sql`${dogs.status} not in ('retired', 'withdrawn')`)).orderBy(asc(dogs.createdAt)).limit(1)
  return {
    clientId: client.id,
    dogId: dog?.id ?? null,
    milestoneId: input.milestoneId,
    exerciseId: exercise?.id ?? null,
    title: input.title ?? exercise!.title,
    instructions: input.instructions ?? exercise!.instructions,
    expectedVideos: input.expectedVideos ?? exercise?.expectedVideos ?? 1,
    dueDay: input.dueDay,
  }
}

async function requireOwnMilestone(db: DbOrTx, client: ClientRow, milestoneId: string) {
  const [m] = await db.select({ id: clientMilestones.id }).from(clientMilestones)
    .where(and(eq(clientMilestones.id, milestoneId), eq(clientMilestones.clientId, client.id))).limit(1)
  if (!m) homeworkRuleError(422, 'Link the homework to one of this client\'s milestones.', { milestoneId: 'Choose one of this client\'s milestones.' })
}

/** Writes a new assignment inside the caller's transaction: audit line and one e-mail per handler of the household. */
export async function insertHomeworkAssignment(tx: Tx, user: AuthUser, client: ClientRow, values: Awaited<ReturnType<typeof resolveHomeworkAssignment>>, cause: 'set' | 'review') {
  const [row] = await tx.insert(homeworkAssignments).values({ ...values, setById: user.id }).returning()
  await logAudit(tx, {
    actorId: user.id, action: 'homework.assigned', entityType: 'homework_assignment', entityId: row!.id, clientId: client.id,
    data: { title: row!.title, dueDay: row!.dueDay, expectedVideos: row!.expectedVideos, exerciseId: row!.exerciseId, milestoneId: row!.milestoneId, cause },
  })
  // After a review the review e-mail names the next homework: no second e-mail then.
  if (cause === 'set') {
    for (const h of await homeworkHouseholdHandlers(tx, client.id)) {
      await queueEmail(tx, {
        to: h.email,
        dedupeKey: `homework-assigned:${row!.id}:${h.email}`,
        ...composeEmail({
          subject: `New homework: ${row!.title}`,
          greeting: `Hello ${h.name},`,
          paragraphs: [
            `${user.name} has set new homework for the ${client.householdName}: "${row!.title}", due ${dueDayLabel(row!.dueDay)}.`,
            `What to do: ${row!.instructions}`,
            `Film it on your phone and send ${row!.expectedVideos === 1 ? 'the video' : `${row!.expectedVideos} videos`} from the homework page.`,
          ],
          action: { label: 'Open the homework', url: `${useRuntimeConfig().appUrl}/handler/homework/assignments/${row!.id}` },
        }),
      })
    }
  }
  return row!
}

export async function createHomeworkAssignment(user: AuthUser, client: ClientRow, input: AssignmentCreateInput) {
  const db = useDb()
  const values = await resolveHomeworkAssignment(db, client, input, await homeworkToday(db))
  return db.transaction(tx => insertHomeworkAssignment(tx, user, client, values, 'set'))
}

export async function updateHomeworkAssignment(user: AuthUser, assignment: AssignmentRow, client: ClientRow, input: AssignmentUpdateInput) {
  if (assignment.state !== 'open') homeworkRuleError(409, `This homework is ${assignment.state === 'done' ? 'done' : 'cancelled'}: set new homework instead of changing it.`)
  const db = useDb()
  if (input.dueDay !== undefined && input.dueDay !== assignment.dueDay) {
    const problem = dueDayProblem(input.dueDay, await homeworkToday(db))
    if (problem) homeworkRuleError(422, problem, { dueDay: problem })
  }
  if (input.milestoneId) await requireOwnMilestone(db, client, input.milestoneId)
  const change = Object.fromEntries(Object.entries(input).filter(([k, v]) => v !== undefined && (assignment as Record<string, unknown>)[k] !== v)) as Partial<AssignmentRow>
  if (!Object.keys(change).length) return assignment
  return db.transaction(async (tx) => {
    const videos = await tx.select({ reviewOutcome: homeworkVideos.reviewOutcome }).from(homeworkVideos).where(eq(homeworkVideos.assignmentId, assignment.id))
    const done = change.expectedVideos !== undefined && assignmentCompletion(change.expectedVideos, videos).complete
    const [row] = await tx.update(homeworkAssignments).set({ ...change, ...(done ? { state: 'done' as const } : {}), updatedAt: new Date() })
      .where(and(eq(homeworkAssignments.id, assignment.id), eq(homeworkAssignments.state, 'open'))).returning()
    if (!row) homeworkRuleError(409, 'This homework was just closed by someone else. Reload the page.')
    await logAudit(tx, {
      actorId: user.id, action: 'homework.updated', entityType: 'homework_assignment', entityId: assignment.id, clientId: client.id,
      data: { title: row.title, fields: Object.keys(change), before: Object.fromEntries(Object.keys(change).map(k => [k, (assignment as Record<string, unknown>)[k]])), after: change, ...(done ? { completed: true } : {}) },
    })
    return row
  })
}

export async function cancelHomeworkAssignment(user: AuthUser, assignment: AssignmentRow, client: ClientRow, reason: string | null) {
  if (assignment.state !== 'open') homeworkRuleError(409, `This homework is already ${assignment.state === 'done' ? 'done' : 'cancelled'}.`)
  return useDb().transaction(async (tx) => {
    const [row] = await tx.update(homeworkAssignments).set({ state: 'cancelled', updatedAt: new Date() })
      .where(and(eq(homeworkAssignments.id, assignment.id), eq(homeworkAssignments.state, 'open'))).returning()
    if (!row) homeworkRuleError(409, 'This homework was just closed by someone else. Reload the page.')
    await logAudit(tx, { actorId: user.id, action: 'homework.cancelled', entityType: 'homework_assignment', entityId: assignment.id, clientId: client.id, data: { title: row.title, reason } })
    return row
  })
}

export function homeworkHouseholdHandlers(db: DbOrTx, clientId: string) {
  return householdHandlers(db, clientId, { activeOnly: true })
}

// ---------------------------------------------------------------------------------------------------------------
// Reading: a household's homework, one assignment with its videos

export const homeworkVideoFileUrl = (videoId: string) => `/api/homework-videos/${videoId}/file`

/** Videos (oldest first) with their comments (in time order) for some assignments. */
export async function homeworkVideosWithComments(db: DbOrTx, assignmentIds: string[]) {
  if (!assignmentIds.length) return []
  const videos = await db.select({ video: homeworkVideos, uploadedByName: users.name }).from(homeworkVideos)
    .leftJoin(users, eq(users.id, homeworkVideos.uploadedById))
    .where(inArray(homeworkVideos.assignmentId, assignmentIds)).orderBy(asc(homeworkVideos.createdAt), asc(homeworkVideos.id))
  const comments = videos.length
    ? await db.select({ comment: homeworkComments, authorName: users.name }).from(homeworkComments).leftJoin(users, eq(users.id, homeworkComments.authorId))
      .where(inArray(homeworkComments.videoId, videos.map(v => v.video.id))).orderBy(asc(homeworkComments.atSeconds), asc(homeworkComments.createdAt))
    : []
  const now = new Date()
  return videos.map(({ video, uploadedByName }) => ({
    ...video, uploadedByName, fileUrl: homeworkVideoFileUrl(video.id), queueState: reviewState(video, now),
    comments: comments.filter(c => c.comment.videoId === video.id).map(c => ({ ...c.comment, authorName: c.authorName })),
  }))
}

export async function listClientHomework(user: AuthUser, client: ClientRow) {
  const db = useDb()
  const today = await homeworkToday(db)
  const rows = await db.select({ assignment: homeworkAssignments, milestoneName: clientMilestones.name, setByName: users.name }).from(homeworkAssignments)
    .leftJoin(clientMilestones, eq(clientMilestones.id, homeworkAssignments.milestoneId))
    .leftJoin(users, eq(users.id, homeworkAssignments.setById))
    .where(eq(homeworkAssignments.clientId, client.id))
  const videos = await homeworkVideosWithComments(db, rows.map(r => r.assignment.id))
  const notes = await homeworkNotesOf(rows.map(r => r.assignment.id))
  const out = rows.map(({ assignment, milestoneName, setByName }) => {
    const own = videos.filter(v => v.assignmentId === assignment.id)
    return {
      ...assignment, milestoneName, setByName, due: assignmentDue(assignment, today),
      completion: assignmentCompletion(assignment.expectedVideos, own), videos: own,
      notes: notes.filter(n => n.assignmentId === assignment.id),
      toReview: own.filter(v => v.reviewedAt === null).length,
    }
  })
  out.sort(compareAssignments)
  const [dog] = await db.select({ name: dogs.name }).from(dogs).where(eq(dogs.clientId, client.id)).orderBy(asc(dogs.createdAt)).limit(1)
  return {
    client: { id: client.id, householdName: client.householdName, dogName: dog?.name ?? null },
    today, rows: out, canEdit: user.role !== 'handler',
  }
}

export async function getHomeworkAssignmentDetail(user: AuthUser, assignment: AssignmentRow, client: ClientRow) {
  const db = useDb()
  const today = await homeworkToday(db)
  const [extra] = await db.select({ milestoneName: clientMilestones.name, setByName: users.name, dogName: dogs.name }).from(homeworkAssignments)
    .leftJoin(clientMilestones, eq(clientMilestones.id, homeworkAssignments.milestoneId))
    .leftJoin(users, eq(users.id, homeworkAssignments.setById))
    .leftJoin(dogs, eq(dogs.id, homeworkAssignments.dogId))
    .where(eq(homeworkAssignments.id, assignment.id)).limit(1)
  const videos = await homeworkVideosWithComments(db, [assignment.id])
  const notes = await listHomeworkNotes(assignment.id)
  const policy = await readSetting(HOMEWORK_UPLOAD_POLICY_KEY, homeworkUploadPolicySchema, HOMEWORK_UPLOAD_POLICY_DEFAULTS, db)
  return {
    ...assignment, ...extra, due: assignmentDue(assignment, today), today,
    completion: assignmentCompletion(assignment.expectedVideos, videos), videos, notes,
    canAddNotes: assignment.state !== 'cancelled',
    client: { id: client.id, householdName: client.householdName },
    canUpload: user.role === 'handler' && assignment.state === 'open',
    maxUploadBytes: megabytesToBytes(policy.maxUploadMegabytes),
    canEdit: user.role !== 'handler' && assignment.state === 'open',
  }
}

// ---------------------------------------------------------------------------------------------------------------
// Roster column: videos waiting for review per client, one query for the page

export async function homeworkRosterCounts(clientIds: string[]): Promise<Map<string, { toReview: number, oldestAt: number | null }>> {
  if (!clientIds.length) return new Map()
  const rows = await useDb().select({ clientId: homeworkVideos.clientId, n: count(), oldest: min(homeworkVideos.createdAt) }).from(homeworkVideos)
    .where(and(inArray(homeworkVideos.clientId, clientIds), isNull(homeworkVideos.reviewedAt)))
    .groupBy(homeworkVideos.clientId)
  return new Map(rows.map(r => [r.clientId, { toReview: Number(r.n), oldestAt: r.oldest ? +new Date(r.oldest as unknown as number) : null }]))
}
