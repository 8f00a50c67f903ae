// Homework, the review half: the trainer's queue of videos across their clients (oldest first), one video with its
// timed comments, adding and removing comments, and the review (outcome, notes, optionally the next homework) with
// the household's e-mail in the same transaction. Pure rules live in shared/utils/homework.ts.
import type { H3Event } from 'h3'
import { and, asc, count, desc, eq, isNotNull, isNull, lt, sql, type SQL } from 'drizzle-orm'
import { clients, dogs, homeworkAssignments, homeworkComments, homeworkVideos, users } from '../database/schema'
import type { CommentInput, QueueQuery, ReviewInput } from '../../shared/schemas/homework'
import { REVIEW_WITHIN_DAYS, assignmentCompletion, commentTimeProblem, formatClock, reviewState, reviewSummary } from '../../shared/utils/homework'
import type { AuthUser } from '../utils/authz'

type ClientRow = typeof clients.$inferSelect
type VideoRow = typeof homeworkVideos.$inferSelect

export async function requireHomeworkVideoAccess(event: H3Event, videoId: string, opts: { staff?: boolean } = {}) {
  const user = requireUser(event)
  const [row] = await useDb().select({ video: homeworkVideos, assignment: homeworkAssignments, client: clients }).from(homeworkVideos)
    .innerJoin(homeworkAssignments, eq(homeworkAssignments.id, homeworkVideos.assignmentId))
    .innerJoin(clients, eq(clients.id, homeworkVideos.clientId))
    .where(and(eq(homeworkVideos.id, videoId), clientScope(user))).limit(1)
  if (!row) notFound('homework video')
  if (opts.staff && user.role === 'handler') throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: 'Only the trainer can comment on and review homework videos.' })
  return { user, ...row }
}

export async function requireHomeworkCommentAccess(event: H3Event, commentId: string) {
  const user = requireUser(event)
  const [row] = await useDb().select({ comment: homeworkComments, video: homeworkVideos }).from(homeworkComments)
    .innerJoin(homeworkVideos, eq(homeworkVideos.id, homeworkComments.videoId))
    .innerJoin(clients, eq(clients.id, homeworkVideos.clientId))
    .where(and(eq(homeworkComments.id, commentId), clientScope(user))).limit(1)
  if (!row) notFound('comment')
  if (user.role === 'handler') throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: 'Only the trainer can remove a comment.' })
  return { user, ...row }
}

// ---------------------------------------------------------------------------------------------------------------
// The queue

export async function listHomeworkReviewQueue(user: AuthUser, q: QueueQuery) {
  const db = useDb()
  const overdueBefore = new Date(Date.now() - REVIEW_WITHIN_DAYS * 86_400_000)
  const conditions: (SQL | undefined)[] = [clientScope(user)]
  if (q.clientId) conditions.push(eq(homeworkVideos.clientId, q.clientId))
  if (q.state === 'awaiting') conditions.push(isNull(homeworkVideos.reviewedAt))
  if (q.state === 'overdue') conditions.push(isNull(homeworkVideos.reviewedAt), lt(homeworkVideos.createdAt, overdueBefore))
  if (q.state === 'reviewed') conditions.push(isNotNull(homeworkVideos.reviewedAt))
  if (q.outcome) conditions.push(eq(homeworkVideos.reviewOutcome, q.outcome))
  const where = and(...conditions)
  const trainer = sql<string>`(select ${users.name} from ${users} where ${users.id} = ${clients.trainerId})`.as('trainer_name')
  const dogName = sql<string | null>`(select ${dogs.name} from ${dogs} where ${dogs.id} = ${homeworkAssignments.dogId})`.as('dog_name')
  const commentCount = sql<number>`(select count(*) from ${homeworkComments} where ${homeworkComments.videoId} = ${homeworkVideos.id})`.as('comment_count')
  const [rows, [total], clientOptions] = await Promise.all([
    db.select({
      video: homeworkVideos, uploadedByName: users.name, assignmentTitle: homeworkAssignments.title, assignmentDueDay: homeworkAssignments.dueDay,
      householdName: clients.householdName, trainerName: trainer, dogName, commentCount,
    }).from(homeworkVideos)
      .innerJoin(homeworkAssignments, eq(homeworkAssignments.id, homeworkVideos.assignmentId))
      .innerJoin(clients, eq(clients.id, homeworkVideos.clientId))
      .leftJoin(users, eq(users.id, homeworkVideos.uploadedById))
      .where(where)
      // The queue's order (shared/utils/homework.ts compareQueue): waiting first, oldest first; reviewed ones after, latest review first.
      .orderBy(sql`${homeworkVideos.reviewedAt} is not null`, asc(sql`case when ${homeworkVideos.reviewedAt} is null then ${homeworkVideos.createdAt} end`), desc(homeworkVideos.reviewedAt), asc(homeworkVideos.id))
      .limit(q.pageSize).offset((q.page - 1) * q.pageSize),
    db.select({ n: count() }).from(homeworkVideos).innerJoin(clients, eq(clients.id, homeworkVideos.clientId)).where(where),
    db.selectDistinct({ id: clients.id, householdName: clients.householdName }).from(homeworkVideos)
      .innerJoin(clients, eq(clients.id, homeworkVideos.clientId)).where(clientScope(user)).orderBy(asc(clients.householdName)),
  ])
  const now = new Date()
  return {
    rows: rows.map(r => ({
      id: r.video.id, assignmentId: r.video.assignmentId, clientId: r.video.clientId, fileName: r.video.fileName, size: r.video.size,
      durationSeconds: r.video.durationSeconds, createdAt: r.video.createdAt, reviewedAt: r.video.reviewedAt, reviewOutcome: r.video.reviewOutcome,
      state: reviewState(r.video, now), uploadedByName: r.uploadedByName, assignmentTitle: r.assignmentTitle, assignmentDueDay: r.assignmentDueDay,
      householdName: r.householdName, trainerName: r.trainerName, dogName: r.dogName, commentCount: Number(r.commentCount),
    })),
    total: Number(total?.n ?? 0),
    clients: clientOptions,
    reviewWithinDays: REVIEW_WITHIN_DAYS,
  }
}

// ---------------------------------------------------------------------------------------------------------------
// One video

export async function getHomeworkVideoDetail(user: AuthUser, video: VideoRow, assignment: typeof homeworkAssignments.$inferSelect, client: ClientRow) {
  const db = useDb()
  const [[withComments], [dog], [reviewer], siblings] = await Promise.all([
    homeworkVideosWithComments(db, [assignment.id]).then(all => all.filter(v => v.id === video.id)),
    assignment.dogId ? db.select({ name: dogs.name }).from(dogs).where(eq(dogs.id, assignment.dogId)).limit(1) : Promise.resolve([]),
    video.reviewedById ? db.select({ name: users.name }).from(users).where(eq(users.id, video.reviewedById)).limit(1) : Promise.resolve([]),
    db.select({ reviewOutcome: homeworkVideos.reviewOutcome }).from(homeworkVideos).where(eq(homeworkVideos.assignmentId, assignment.id)),
  ])
  const [next] = video.nextAssignmentId
    ? await db.select({ id: homeworkAssignments.id, title: homeworkAssignments.title, dueDay: homeworkAssignments.dueDay }).from(homeworkAssignments).where(eq(homeworkAssignments.id, video.nextAssignmentId)).limit(1)
    : []
  return {
    video: { ...withComments!, reviewedByName: (reviewer as { name: string } | undefined)?.name ?? null },
    assignment: { id: assignment.id, title: assignment.title, instructions: assignment.instructions, dueDay: assignment.dueDay, state: assignment.state, expectedVideos: assignment.expectedVideos, milestoneId: assignment.milestoneId },
    completion: assignmentCompletion(assignment.expectedVideos, siblings),
    client: { id: client.id, householdName: client.householdName, dogName: (dog as { name: string } | undefined)?.name ?? null },
    next: next ?? null,
    today: await homeworkToday(db),
    canReview: user.role !== 'handler',
  }
}

// ---------------------------------------------------------------------------------------------------------------
// Comments

export async function addHomeworkComment(user: AuthUser, video: VideoRow, input: CommentInput) {
  const problem = commentTimeProblem(input.atSeconds, video.durationSeconds)
  if (problem) homeworkRuleError(422, problem, { atSeconds: problem })
  return useDb().transaction(async (tx) => {
    const [row] = await tx.insert(homeworkComments).values({ videoId: video.id, authorId: user.id, atSeconds: input.atSeconds, body: input.body }).returning()
    await logAudit(tx, {
      actorId: user.id, action: 'homework-comment.added', entityType: 'homework_comment', entityId: row!.id, clientId: video.clientId,
      data: { videoId: video.id, atSeconds: input.atSeconds, title: `at ${formatClock(input.atSeconds)}` },
    })
    return { ...row!, authorName: user.name }
  })
}

export async function deleteHomeworkComment(user: AuthUser, comment: typeof homeworkComments.$inferSelect, video: VideoRow) {
  return useDb().transaction(async (tx) => {
    await tx.delete(homeworkComments).where(eq(homeworkComments.id, comment.id))
    await logAudit(tx, {
      actorId: user.id, action: 'homework-comment.deleted', entityType: 'homework_comment', entityId: comment.id, clientId: video.clientId,
      data: { videoId: video.id, atSeconds: comment.atSeconds, body: comment.body, title: `at ${formatClock(comment.atSeconds)}` },
    })
    return { ok: true }
  })
}

// ---------------------------------------------------------------------------------------------------------------
// The review

export async function reviewHomeworkVideo(user: AuthUser, video: VideoRow, assignment: typeof homeworkAssignments.$inferSelect, client: ClientRow, input: ReviewInput) {
  if (video.reviewedAt) homeworkRuleError(409, 'This video was already reviewed. Add a comment if you have more to say.')
  const db = useDb()
  const nextValues = input.next ? await resolveHomeworkAssignment(db, client, input.next, await homeworkToday(db)).catch((err) => {
    // Field errors of the next homework sit under "next." in the form.
    const fe = err?.data?.fieldErrors as Record<string, string> | undefined
    if (fe) homeworkRuleError(422, err.message, Object.fromEntries(Object.entries(fe).map(([k, v]) => [`next.${k}`, v])))
    throw err
  }) : null
  return db.transaction(async (tx) => {
    const now = new Date()
    const next = nextValues ? await insertHomeworkAssignment(tx, user, client, nextValues, 'review') : null
    const [updated] = await tx.update(homeworkVideos).set({
      reviewOutcome: input.outcome, reviewNotes: input.notes, reviewedAt: now, reviewedById: user.id, nextAssignmentId: next?.id ?? null, updatedAt: now,
    }).where(and(eq(homeworkVideos.id, video.id), isNull(homeworkVideos.reviewedAt))).returning()
    if (!updated) homeworkRuleError(409, 'This video was just reviewed by someone else. Reload the page.')
    const siblings = await tx.select({ reviewOutcome: homeworkVideos.reviewOutcome }).from(homeworkVideos).where(eq(homeworkVideos.assignmentId, assignment.id))
    const completion = assignmentCompletion(assignment.expectedVideos, siblings)
    let completed = false
    if (completion.complete && assignment.state === 'open') {
      const done = await tx.update(homeworkAssignments).set({ state: 'done', updatedAt: now })
        .where(and(eq(homeworkAssignments.id, assignment.id), eq(homeworkAssignments.state, 'open'))).returning({ id: homeworkAssignments.id })
      completed = done.length > 0
    }
    const comments = await tx.select({ atSeconds: homeworkComments.atSeconds, body: homeworkComments.body }).from(homeworkComments).where(eq(homeworkComments.videoId, video.id))
    await logAudit(tx, {
      actorId: user.id, action: 'homework.reviewed', entityType: 'homework_video', entityId: video.id, clientId: client.id,
      data: { title: assignment.title, assignmentId: assignment.id, outcome: input.outcome, notes: input.notes, comments: comments.length, completed, nextAssignmentId: next?.id ?? null },
    })
    if (completed) {
      await logAudit(tx, { actorId: user.id, action: 'homework.completed', entityType: 'homework_assignment', entityId: assignment.id, clientId: client.id, data: { title: assignment.title } })
    }
    const [dog] = assignment.dogId ? await tx.select({ name: dogs.name }).from(dogs).where(eq(dogs.id, assignment.dogId)).limit(1) : []
    const paragraphs = reviewSummary({
      assignmentTitle: assignment.title, dogName: dog?.name ?? null, outcome: input.outcome, notes: input.notes, comments, completion,
      next: next ? { title: next.title, dueDay: next.dueDay } : null,
    })
    for (const h of await homeworkHouseholdHandlers(tx, client.id)) {
      await queueEmail(tx, {
        to: h.email,
        dedupeKey: `homework-review:${video.id}:${h.email}`,
        ...composeEmail({
          subject: `${input.outcome === 'approved' ? 'Homework approved' : 'Homework: please try again'}: ${assignment.title}`,
          greeting: `Hello ${h.name},`,
          paragraphs,
          action: { label: 'Watch the video with the comments', url: `${useRuntimeConfig().appUrl}/handler/homework/videos/${video.id}` },
        }),
      })
    }
    return { video: updated, completed, next }
  })
}
