// Homework notes: the household's few words about each practice, kept on the phone until there is a signal
// (docs/offline.md), read by the trainer beside the videos.
import { asc, eq, inArray } from 'drizzle-orm'
import { homeworkNotes, users } from '../database/schema'
import type { homeworkAssignments } from '../database/schema'
import type { HomeworkNoteInput } from '../../shared/schemas/homework-notes'
import { TAPPED_AHEAD_LIMIT_MS } from '../../shared/utils/request-keys'
import type { AuthUser } from '../utils/authz'

type AssignmentRow = typeof homeworkAssignments.$inferSelect

/** A note on a homework of the household: refused (422, with what to do) when the homework was cancelled meanwhile. */
export async function addHomeworkNote(user: AuthUser, assignment: AssignmentRow, input: HomeworkNoteInput, tappedAt: Date | null) {
  if (assignment.state === 'cancelled') {
    homeworkRuleError(422, `Your trainer cancelled the homework "${assignment.title}", so notes can no longer be added to it. Copy the note into a message to your trainer if it matters, then discard it.`)
  }
  const now = new Date()
  const practisedAt = input.practisedAt ?? tappedAt ?? now
  if (practisedAt.getTime() - now.getTime() > TAPPED_AHEAD_LIMIT_MS) {
    homeworkRuleError(422, 'The practice time is in the future. Enter when you practised.', { practisedAt: 'Enter when you practised.' })
  }
  return useDb().transaction(async (tx) => {
    const [row] = await tx.insert(homeworkNotes).values({ assignmentId: assignment.id, clientId: assignment.clientId, authorId: user.id, practisedAt, body: input.body }).returning()
    await logAudit(tx, { actorId: user.id, action: 'homework-note.added', entityType: 'homework-note', entityId: row!.id, clientId: assignment.clientId, data: { assignmentId: assignment.id } })
    return { ...row!, authorName: user.name }
  })
}

/** The notes of one assignment, oldest practice first. */
export async function listHomeworkNotes(assignmentId: string) {
  return useDb().select({ id: homeworkNotes.id, practisedAt: homeworkNotes.practisedAt, body: homeworkNotes.body, authorName: users.name, createdAt: homeworkNotes.createdAt })
    .from(homeworkNotes).leftJoin(users, eq(users.id, homeworkNotes.authorId))
    .where(eq(homeworkNotes.assignmentId, assignmentId)).orderBy(asc(homeworkNotes.practisedAt))
}

/** The notes of several assignments (one query for a household's homework list). */
export async function homeworkNotesOf(assignmentIds: string[]) {
  if (!assignmentIds.length) return []
  return useDb().select({ id: homeworkNotes.id, assignmentId: homeworkNotes.assignmentId, practisedAt: homeworkNotes.practisedAt, body: homeworkNotes.body, authorName: users.name })
    .from(homeworkNotes).leftJoin(users, eq(users.id, homeworkNotes.authorId))
    .where(inArray(homeworkNotes.assignmentId, assignmentIds)).orderBy(asc(homeworkNotes.practisedAt))
}
