// Messages: one conversation per household between its handlers, its trainer and the office. Attachments (a photo
// or a PDF) are checked by their bytes and kept in the file storage like documents. Unread counts per person; an
// e-mail "you have a new message" at most once an hour per person, never with the message itself.
import type { H3Event } from 'h3'
import { and, asc, count, desc, eq, gt, inArray, isNull, lt, ne, or, sql } from 'drizzle-orm'
import { clients, homeworkVideos, messageNotices, messageReads, messages, reminderPreferences, users } from '../database/schema'
import type { MessageCreateInput } from '../../shared/schemas/schedule'
import { messageNoticeDue } from '../../shared/utils/reminders'
import type { AuthUser } from '../utils/authz'
import type { DbOrTx, Tx } from '../utils/db'

type ClientRow = typeof clients.$inferSelect

export async function requireMessageAccess(event: H3Event, messageId: string) {
  const user = requireUser(event)
  const [row] = await useDb().select({ message: messages }).from(messages)
    .innerJoin(clients, eq(clients.id, messages.clientId))
    .where(and(eq(messages.id, messageId), clientScope(user))).limit(1)
  if (!row) notFound('message')
  return { user, message: row.message }
}

export async function listMessages(user: AuthUser, client: ClientRow, opts: { before?: Date, limit?: number } = {}) {
  const db = useDb()
  const limit = opts.limit ?? 100
  const rows = await db.select({
    id: messages.id, body: messages.body, createdAt: messages.createdAt, authorId: messages.authorId, authorName: users.name, authorRole: users.role,
    homeworkVideoId: messages.homeworkVideoId, videoName: homeworkVideos.fileName, videoAssignmentId: homeworkVideos.assignmentId,
    attachmentName: messages.attachmentName, attachmentType: messages.attachmentType, attachmentBytes: messages.attachmentBytes,
  }).from(messages).leftJoin(users, eq(users.id, messages.authorId)).leftJoin(homeworkVideos, eq(homeworkVideos.id, messages.homeworkVideoId))
    .where(and(eq(messages.clientId, client.id), opts.before ? lt(messages.createdAt, opts.before) : undefined))
    .orderBy(desc(messages.createdAt), desc(messages.id)).limit(limit + 1)
  const [read] = await db.select({ readAt: messageReads.readAt }).from(messageReads)
    .where(and(eq(messageReads.clientId, client.id), eq(messageReads.userId, user.id))).limit(1)
  const more = rows.length > limit
  const list = rows.slice(0, limit).reverse().map(m => ({
    ...m,
    mine: m.authorId === user.id,
    unread: m.authorId !== user.id && (!read || m.createdAt > read.readAt),
    attachmentUrl: m.attachmentName ? `/api/messages/${m.id}/attachment` : null,
  }))
  return { householdName: client.householdName, rows: list, more, readAt: read?.readAt ?? null }
}

/** Marks the conversation read up to now for this person. */
export async function markConversationRead(user: AuthUser, clientId: string, at = new Date()) {
  await useDb().insert(messageReads).values({ clientId, userId: user.id, readAt: at })
    .onConflictDoUpdate({ target: [messageReads.clientId, messageReads.userId], set: { readAt: sql`max(${messageReads.readAt}, ${at.getTime()})` } })
}

async function checkVideo(db: DbOrTx, clientId: string, videoId: string | null | undefined) {
  if (!videoId) return null
  const [v] = await db.select({ id: homeworkVideos.id }).from(homeworkVideos).where(and(eq(homeworkVideos.id, videoId), eq(homeworkVideos.clientId, clientId))).limit(1)
  if (!v) throw createError({ statusCode: 422, statusMessage: 'Unprocessable Content', message: 'That video is not one of this household\'s homework videos.', data: { fieldErrors: { homeworkVideoId: 'Choose one of this household\'s videos.' } } })
  return v.id
}

/** The people a message in this conversation is for: the household's handlers and its trainer, never the author. */
async function conversationPeople(db: DbOrTx, client: ClientRow) {
  const handlers = await householdHandlers(db, client.id, { activeOnly: true })
  const [trainer] = await db.select({ id: users.id, email: users.email, name: users.name }).from(users).where(and(eq(users.id, client.trainerId), isNull(users.disabledAt))).limit(1)
  return [...handlers.map(h => ({ ...h, role: 'handler' as const })), ...(trainer ? [{ ...trainer, role: 'trainer' as const }] : [])]
}

export async function sendHouseholdMessage(user: AuthUser, client: ClientRow, input: MessageCreateInput, file?: { name: string, bytes: Buffer, contentType: string }) {
  const db = useDb()
  const videoId = await checkVideo(db, client.id, input.homeworkVideoId)
  const id = crypto.randomUUID()
  const key = file ? `clients/${client.id}/messages/${id}` : null
  const storage = useFileStorage()
  try {
    if (file) await storage.put(key!, file.bytes, { contentType: file.contentType })
    await db.transaction(async (tx) => {
      const now = new Date()
      await tx.insert(messages).values({
        id, clientId: client.id, authorId: user.id, body: input.body, homeworkVideoId: videoId,
        attachmentKey: key, attachmentName: file?.name.slice(0, 200) ?? null, attachmentType: file?.contentType ?? null, attachmentBytes: file?.bytes.length ?? null, createdAt: now,
      })
      // Writing a message means the author has read the conversation so far.
      await tx.insert(messageReads).values({ clientId: client.id, userId: user.id, readAt: now })
        .onConflictDoUpdate({ target: [messageReads.clientId, messageReads.userId], set: { readAt: now } })
      await logAudit(tx, { actorId: user.id, action: 'message.sent', entityType: 'message', entityId: id, clientId: client.id, data: { attachment: !!file } })
      await queueMessageNotices(tx, client, user, now)
    })
  }
  catch (err) {
    if (key) await storage.delete(key).catch(() => {})
    throw uploadSaveFailed(err, 'message')
  }
  return (await listMessages(user, client, { limit: 1 })).rows.at(-1)!
}

/** "You have a new message" to everyone else in the conversation, at most once an hour each, no content. */
async function queueMessageNotices(tx: Tx, client: ClientRow, author: AuthUser, now: Date) {
  const policy = await readWorkingDayPolicy(tx)
  if (!policy.messageNotices) return
  const people = (await conversationPeople(tx, client)).filter(p => p.id !== author.id)
  if (!people.length) return
  const [prefs, notices] = await Promise.all([
    tx.select({ userId: reminderPreferences.userId }).from(reminderPreferences).where(and(inArray(reminderPreferences.userId, people.map(p => p.id)), eq(reminderPreferences.kind, 'messages'), eq(reminderPreferences.enabled, false))),
    tx.select().from(messageNotices).where(inArray(messageNotices.userId, people.map(p => p.id))),
  ])
  const off = new Set(prefs.map(p => p.userId))
  const last = new Map(notices.map(n => [n.userId, n.noticedAt]))
  for (const p of people) {
    if (off.has(p.id) || !messageNoticeDue(last.get(p.id) ?? null, now)) continue
    await tx.insert(messageNotices).values({ userId: p.id, noticedAt: now }).onConflictDoUpdate({ target: messageNotices.userId, set: { noticedAt: now } })
    const path = p.role === 'handler' ? `/handler/messages/${client.id}` : `/trainer/clients/${client.id}/messages`
    await queueEmail(tx, {
      to: p.email,
      ...composeEmail({
        subject: 'You have a new message in Forescent',
        greeting: `Hello ${p.name},`,
        paragraphs: ['You have a new message waiting in Forescent. For your privacy, messages are only shown after you sign in.'],
        action: { label: 'Read it', url: appUrl(path) },
      }),
    })
  }
}

/** Unread messages per conversation for this person, in the conversations they may see. */
export async function unreadConversations(user: AuthUser, clientIds?: string[]) {
  const db = useDb()
  const rows = await db.select({ clientId: messages.clientId, householdName: clients.householdName, unread: count(), latest: sql<number>`max(${messages.createdAt})` })
    .from(messages).innerJoin(clients, eq(clients.id, messages.clientId))
    .leftJoin(messageReads, and(eq(messageReads.clientId, messages.clientId), eq(messageReads.userId, user.id)))
    .where(and(
      clientScope(user),
      clientIds ? inArray(messages.clientId, clientIds) : undefined,
      or(isNull(messages.authorId), ne(messages.authorId, user.id)),
      or(isNull(messageReads.readAt), gt(messages.createdAt, messageReads.readAt)),
      // The office reads every conversation but is counted only in those it has taken part in or opened.
      user.role === 'admin' ? sql`${messageReads.userId} is not null` : undefined,
    ))
    .groupBy(messages.clientId, clients.householdName).orderBy(asc(sql`max(${messages.createdAt})`))
  return rows.map(r => ({ ...r, latest: new Date(Number(r.latest)) }))
}

/** Conversations the user can see, latest first, with unread counts (the messages index). */
export async function listConversations(user: AuthUser, limit = 50) {
  const db = useDb()
  const rows = await db.select({ clientId: messages.clientId, householdName: clients.householdName, latest: sql<number>`max(${messages.createdAt})`, total: count() })
    .from(messages).innerJoin(clients, eq(clients.id, messages.clientId))
    .where(clientScope(user)).groupBy(messages.clientId, clients.householdName).orderBy(desc(sql`max(${messages.createdAt})`)).limit(limit)
  const unread = new Map((await unreadConversations(user, rows.map(r => r.clientId))).map(u => [u.clientId, u.unread]))
  return rows.map(r => ({ ...r, latest: new Date(Number(r.latest)), unread: unread.get(r.clientId) ?? 0 }))
}

