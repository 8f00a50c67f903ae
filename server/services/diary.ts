// The real-life alert diary: loading entries a user may see, every change in one transaction with its audit entry,
// the figures the pages show, the roster column, and the refresher e-mail to the trainer (outbox, once per stretch).
import type { H3Event } from 'h3'
import { and, asc, eq, gte, inArray } from 'drizzle-orm'
import { alias } from 'drizzle-orm/sqlite-core'
import { clients, diaryEntries, diaryWindows, dogs, users } from '../database/schema'
import type { DiaryEntryCreateInput, DiaryEntryUpdateInput, DiaryReviewInput, DiaryWindowInput } from '../../shared/schemas/diary'
import { DIARY_POLICY_DEFAULTS, DIARY_POLICY_KEY, diaryPolicySchema, type DiaryPolicy } from '../../shared/schemas/settings-diary'
import { MIN_EPISODES_FOR_EVIDENCE } from '../../shared/utils/alerts'
import {
  CONDITION_EPISODE_NOUNS, DAY_MS, FUTURE_SKEW_MINUTES, MAX_WINDOW_MINUTES, effectiveWindow, leadTimesByMonth, matchEntries, percent,
  periodSentence, periodTotals, refresherCheck, type DiaryPoint,
} from '../../shared/utils/diary'
import type { AuthUser } from '../utils/authz'
import type { DbOrTx, Tx } from '../utils/db'

type EntryRow = typeof diaryEntries.$inferSelect
type ClientRow = typeof clients.$inferSelect

export function readDiaryPolicy(db: DbOrTx = useDb()): Promise<DiaryPolicy> {
  return readSetting(DIARY_POLICY_KEY, diaryPolicySchema, DIARY_POLICY_DEFAULTS, db)
}

function diaryRuleError(fieldErrors: Record<string, string>): never {
  throw createError({ statusCode: 422, statusMessage: 'Unprocessable Content', message: Object.values(fieldErrors).join(' '), data: { fieldErrors } })
}

/** Loads a diary entry whose client the user may see, or answers 404 (the same for "does not exist" and "not yours"). */
export async function requireDiaryEntryAccess(event: H3Event, entryId: string, opts: { staff?: boolean } = {}) {
  const user = requireUser(event)
  const [row] = await useDb().select({ entry: diaryEntries, client: clients }).from(diaryEntries)
    .innerJoin(clients, eq(clients.id, diaryEntries.clientId))
    .where(and(eq(diaryEntries.id, entryId), clientScope(user))).limit(1)
  if (!row) notFound('diary entry')
  if (opts.staff && user.role === 'handler') {
    throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: 'Only the trainer can review alerts.' })
  }
  return { user, entry: row.entry, client: row.client }
}

/** "12 Nov 2026, 14:32" in the user's time zone, for audit lines and e-mails. */
function when(instant: Date, timeZone: string): string {
  try {
    return new Intl.DateTimeFormat('en-GB', { dateStyle: 'medium', timeStyle: 'short', timeZone }).format(instant)
  }
  catch {
    return `${instant.toISOString().slice(0, 16).replace('T', ' ')} UTC`
  }
}

function refuseFuture(user: AuthUser, kind: 'alert' | 'episode', occurredAt: Date) {
  if (occurredAt.getTime() > Date.now() + FUTURE_SKEW_MINUTES * 60_000) {
    diaryRuleError({
      occurredAt: kind === 'episode'
        ? `An episode cannot start in the future (it is now ${when(new Date(), user.timeZone)}). Check the date and time.`
        : `An alert cannot be in the future (it is now ${when(new Date(), user.timeZone)}). Check the date and time.`,
    })
  }
}

// ---------------------------------------------------------------------------------------------------------------
// Reading

const createdBy = alias(users, 'created_by')
const reviewedBy = alias(users, 'reviewed_by')

async function windowOverride(db: DbOrTx, clientId: string) {
  const [row] = await db.select().from(diaryWindows).where(eq(diaryWindows.clientId, clientId)).limit(1)
  return row ?? null
}

/** The whole diary of a client: entries newest first with what each matched, the period summary and the monthly leads. */
export async function getClientDiary(user: AuthUser, client: ClientRow) {
  const db = useDb()
  const [rows, override, policy, [dog]] = await Promise.all([
    db.select({ entry: diaryEntries, createdByName: createdBy.name, reviewedByName: reviewedBy.name }).from(diaryEntries)
      .leftJoin(createdBy, eq(createdBy.id, diaryEntries.createdById))
      .leftJoin(reviewedBy, eq(reviewedBy.id, diaryEntries.reviewedById))
      .where(eq(diaryEntries.clientId, client.id)).orderBy(asc(diaryEntries.occurredAt), asc(diaryEntries.id)),
    windowOverride(db, client.id),
    readDiaryPolicy(db),
    db.select({ name: dogs.name }).from(dogs).where(eq(dogs.clientId, client.id)).orderBy(asc(dogs.createdAt), asc(dogs.id)).limit(1),
  ])
  const { window, source } = effectiveWindow(override, policy, client.condition)
  const points: DiaryPoint[] = rows.map(r => r.entry)
  const match = matchEntries(points, window, { minLeadMinutes: policy.minLeadMinutes })
  const alertMatch = new Map(match.alerts.map(a => [a.id, a]))
  const episodeMatch = new Map(match.episodes.map(e => [e.id, e]))
  const now = new Date()
  const since = new Date(now.getTime() - policy.summaryDays * DAY_MS)
  const period = periodTotals(points, match, since)
  const canStaff = user.role !== 'handler'
  return {
    client: { id: client.id, householdName: client.householdName, personName: client.personName, condition: client.condition, dogName: dog?.name ?? null },
    window: { ...window, source, policy: policy[client.condition], minLeadMinutes: policy.minLeadMinutes },
    summaryDays: policy.summaryDays,
    episodeNoun: CONDITION_EPISODE_NOUNS[client.condition],
    minEpisodesForEvidence: MIN_EPISODES_FOR_EVIDENCE,
    period: { since, totals: period, sentence: periodSentence(period, client.condition, canStaff ? 'staff' : 'handler'), enoughEvidence: period.episodes >= MIN_EPISODES_FOR_EVIDENCE },
    allTime: { totals: match.totals, enoughEvidence: match.totals.episodes >= MIN_EPISODES_FOR_EVIDENCE },
    months: leadTimesByMonth(points, match, user.timeZone),
    refresher: canStaff ? refresherCheck(points, match, policy, now) : null,
    policy: canStaff ? { recentDays: policy.recentDays, minRecentEpisodes: policy.minRecentEpisodes, refresherBelowPercent: policy.refresherBelowPercent } : null,
    entries: rows.reverse().map(({ entry, createdByName, reviewedByName }) => ({
      ...entry,
      createdByName,
      reviewedByName,
      match: entry.kind === 'alert'
        ? { isTrue: alertMatch.get(entry.id)?.isTrue ?? false, outcome: alertMatch.get(entry.id)?.outcome ?? 'false', episodeId: alertMatch.get(entry.id)?.episodeId ?? null }
        : { warned: episodeMatch.get(entry.id)?.warned ?? false, alertIds: episodeMatch.get(entry.id)?.alertIds ?? [], atOnsetAlertIds: episodeMatch.get(entry.id)?.atOnsetAlertIds ?? [], leadMinutes: episodeMatch.get(entry.id)?.leadMinutes ?? null },
    })),
    canReview: canStaff,
    canSetWindow: canStaff,
  }
}

/**
 * The roster column: the last summaryDays of each client's diary, with ONE query for the whole page (entries joined
 * with their client's condition and own window) plus the policy.
 */
export async function diaryRosterFigures(clientIds: string[]): Promise<Map<string, unknown>> {
  const db = useDb()
  const policy = await readDiaryPolicy(db)
  const now = Date.now()
  // The longest window any client can have reaches this far back before the period, so early alerts still match.
  const since = now - policy.summaryDays * DAY_MS
  const rows = await db.select({
    clientId: diaryEntries.clientId, id: diaryEntries.id, kind: diaryEntries.kind, occurredAt: diaryEntries.occurredAt,
    condition: clients.condition, minMinutes: diaryWindows.minMinutes, maxMinutes: diaryWindows.maxMinutes,
  }).from(diaryEntries).innerJoin(clients, eq(clients.id, diaryEntries.clientId))
    .leftJoin(diaryWindows, eq(diaryWindows.clientId, diaryEntries.clientId))
    .where(and(inArray(diaryEntries.clientId, clientIds), gte(diaryEntries.occurredAt, new Date(since - MAX_WINDOW_MINUTES * 60_000))))
  const byClient = new Map<string, typeof rows>()
  for (const r of rows) {
    if (!byClient.has(r.clientId)) byClient.set(r.clientId, [])
    byClient.get(r.clientId)!.push(r)
  }
  const out = new Map<string, unknown>()
  for (const [clientId, list] of byClient) {
    const first = list[0]!
    const override = first.minMinutes !== null && first.maxMinutes !== null ? { minMinutes: first.minMinutes, maxMinutes: first.maxMinutes } : null
    const { window } = effectiveWindow(override, policy, first.condition)
    const match = matchEntries(list, window, { minLeadMinutes: policy.minLeadMinutes })
    const t = periodTotals(list, match, new Date(since))
    out.set(clientId, {
      episodes: t.episodes, warned: t.warnedEpisodes, alerts: t.alerts, trueAlerts: t.trueAlerts, atOnsetAlerts: t.atOnsetAlerts,
      medianLeadMinutes: t.leadMinutes?.median ?? null, enoughEvidence: t.episodes >= MIN_EPISODES_FOR_EVIDENCE, days: policy.summaryDays,
    })
  }
  return out
}

// ---------------------------------------------------------------------------------------------------------------
// Changing

function entryName(kind: 'alert' | 'episode', occurredAt: Date, user: AuthUser) {
  return `${kind === 'alert' ? 'alert' : 'episode'} of ${when(occurredAt, user.timeZone)}`
}

/**
 * After a change, checks the recent warned-of share; when it is below the policy's threshold, writes one e-mail to
 * the trainer (de-duplicated per client and stretch of recentDays), in the same transaction as the change.
 */
async function diaryFollowUp(tx: Tx, clientId: string) {
  const [client] = await tx.select({ client: clients, trainerEmail: users.email, trainerName: users.name }).from(clients)
    .innerJoin(users, eq(users.id, clients.trainerId)).where(eq(clients.id, clientId)).limit(1)
  if (!client) return
  const [points, override, policy] = await Promise.all([
    tx.select({ id: diaryEntries.id, kind: diaryEntries.kind, occurredAt: diaryEntries.occurredAt }).from(diaryEntries).where(eq(diaryEntries.clientId, clientId)),
    windowOverride(tx, clientId),
    readDiaryPolicy(tx),
  ])
  const { window } = effectiveWindow(override, policy, client.client.condition)
  const check = refresherCheck(points, matchEntries(points, window, { minLeadMinutes: policy.minLeadMinutes }), policy, new Date())
  if (!check.due) return
  const appUrl = useRuntimeConfig().appUrl
  const earlier = check.earlierShare === null ? '' : ` Before that it was ${percent(check.earlierShare)}.`
  const mail = composeEmail({
    subject: `Refresher suggested: ${client.client.householdName}`,
    greeting: `Hello ${client.trainerName},`,
    paragraphs: [
      `In the last ${policy.recentDays} days the diary of the ${client.client.householdName} shows the dog warned of ${check.recentWarned} of ${check.recentEpisodes} ${CONDITION_EPISODE_NOUNS[client.client.condition]} (${percent(check.recentShare ?? 0)}), below the ${policy.refresherBelowPercent}% the business policy asks for.${earlier}`,
      'Please look at the diary and schedule a refresher session with the household. Remind them that the dog supplements their treatment plan and never replaces it: they act on their clinician\'s advice, not only on the dog.',
    ],
    action: { label: 'Open the diary', url: `${appUrl}/trainer/clients/${clientId}/diary` },
  })
  await queueEmail(tx, { to: client.trainerEmail, ...mail, dedupeKey: `diary-refresher:${clientId}:${check.bucket}` })
}

export async function createDiaryEntry(user: AuthUser, client: ClientRow, input: DiaryEntryCreateInput) {
  refuseFuture(user, input.kind, input.occurredAt)
  return useDb().transaction(async (tx) => {
    const [entry] = await tx.insert(diaryEntries).values({ ...input, clientId: client.id, createdById: user.id }).returning()
    await logAudit(tx, {
      actorId: user.id, action: `diary-${input.kind}.logged`, entityType: 'diary-entry', entityId: entry!.id, clientId: client.id,
      data: { name: entryName(input.kind, input.occurredAt, user), occurredAt: input.occurredAt.toISOString() },
    })
    await diaryFollowUp(tx, client.id)
    return entry!
  })
}

export async function updateDiaryEntry(user: AuthUser, entry: EntryRow, input: DiaryEntryUpdateInput) {
  const problems: Record<string, string> = {}
  const wrong = entry.kind === 'alert' ? (['severity', 'action'] as const) : (['behaviour', 'place', 'confidence'] as const)
  for (const key of wrong) if (input[key] !== undefined && input[key] !== null) problems[key] = `An ${entry.kind} has no ${key}.`
  if (Object.keys(problems).length) diaryRuleError(problems)
  if (input.occurredAt) refuseFuture(user, entry.kind, input.occurredAt)
  const fields = (Object.keys(input) as (keyof DiaryEntryUpdateInput)[])
    .filter(k => (k === 'occurredAt' ? input.occurredAt!.getTime() !== entry.occurredAt.getTime() : input[k] !== entry[k]))
  return useDb().transaction(async (tx) => {
    const [row] = await tx.update(diaryEntries).set(input).where(eq(diaryEntries.id, entry.id)).returning()
    await logAudit(tx, {
      actorId: user.id, action: `diary-${entry.kind}.edited`, entityType: 'diary-entry', entityId: entry.id, clientId: entry.clientId,
      data: {
        name: entryName(entry.kind, row!.occurredAt, user), fields,
        before: Object.fromEntries(fields.map(k => [k, k === 'occurredAt' ? entry.occurredAt.toISOString() : entry[k]])),
        after: Object.fromEntries(fields.map(k => [k, k === 'occurredAt' ? row!.occurredAt.toISOString() : row![k]])),
      },
    })
    if (fields.includes('occurredAt')) await diaryFollowUp(tx, entry.clientId)
    return row!
  })
}

export async function deleteDiaryEntry(user: AuthUser, entry: EntryRow) {
  return useDb().transaction(async (tx) => {
    await tx.delete(diaryEntries).where(eq(diaryEntries.id, entry.id))
    await logAudit(tx, {
      actorId: user.id, action: `diary-${entry.kind}.deleted`, entityType: 'diary-entry', entityId: entry.id, clientId: entry.clientId,
      data: { name: entryName(entry.kind, entry.occurredAt, user), entry: { ...entry, occurredAt: entry.occurredAt.toISOString() } },
    })
    await diaryFollowUp(tx, entry.clientId)
    return entry
  })
}

export async function reviewDiaryAlert(user: AuthUser, entry: EntryRow, input: DiaryReviewInput) {
  if (entry.kind !== 'alert') {
    throw createError({ statusCode: 409, statusMessage: 'Conflict', message: 'Only alerts are reviewed; this entry is an episode.' })
  }
  return useDb().transaction(async (tx) => {
    const [row] = await tx.update(diaryEntries).set({ reviewedAt: new Date(), reviewedById: user.id, reviewComment: input.comment })
      .where(eq(diaryEntries.id, entry.id)).returning()
    await logAudit(tx, {
      actorId: user.id, action: 'diary-alert.reviewed', entityType: 'diary-entry', entityId: entry.id, clientId: entry.clientId,
      data: { name: entryName('alert', entry.occurredAt, user), comment: input.comment, before: entry.reviewComment },
    })
    return row!
  })
}

export async function setDiaryWindow(user: AuthUser, client: ClientRow, input: DiaryWindowInput) {
  return useDb().transaction(async (tx) => {
    const before = await windowOverride(tx, client.id)
    const [row] = await tx.insert(diaryWindows).values({ clientId: client.id, ...input, updatedById: user.id })
      .onConflictDoUpdate({ target: diaryWindows.clientId, set: { ...input, updatedById: user.id, updatedAt: new Date() } }).returning()
    await logAudit(tx, {
      actorId: user.id, action: 'diary-window.set', entityType: 'diary-window', entityId: client.id, clientId: client.id,
      data: { name: `${input.minMinutes}–${input.maxMinutes} min before onset`, before: before ? { minMinutes: before.minMinutes, maxMinutes: before.maxMinutes } : null, after: input },
    })
    await diaryFollowUp(tx, client.id)
    return row!
  })
}

export async function clearDiaryWindow(user: AuthUser, client: ClientRow) {
  return useDb().transaction(async (tx) => {
    const before = await windowOverride(tx, client.id)
    if (!before) notFound('own diary window for this client')
    await tx.delete(diaryWindows).where(eq(diaryWindows.clientId, client.id))
    await logAudit(tx, {
      actorId: user.id, action: 'diary-window.cleared', entityType: 'diary-window', entityId: client.id, clientId: client.id,
      data: { name: 'back to the business policy', before: { minMinutes: before.minMinutes, maxMinutes: before.maxMinutes } },
    })
    await diaryFollowUp(tx, client.id)
    const policy = await readDiaryPolicy(tx)
    return { clientId: client.id, ...policy[client.condition], source: 'policy' as const }
  })
}
