// Training: programme templates, each client's programme with its readiness figures and sign-off (and the milestone
// e-mail to the household through the outbox), sessions and trials, and the roster column. Pure rules live in
// shared/utils/training.ts and shared/utils/stats.ts.
import type { H3Event } from 'h3'
import { toCsv } from '../../shared/utils/csv'
import { and, asc, desc, eq, gte, inArray, isNull, lte, or, sql, type SQL } from 'drizzle-orm'
import { clientMilestones, clients, dogs, homeworkAssignments, programmeTemplates, sampleUses, samples, trainingSessions, trainingTrials, users } from '../database/schema'
import type { MilestoneAddInput, MilestoneUpdateInput, SessionCreateInput, SessionListQuery, TemplateUpdateInput, TrialInput } from '../../shared/schemas/training'
import { TRAINING_POLICY_DEFAULTS, TRAINING_POLICY_KEY } from '../../shared/schemas/settings-training'
import { criteriaSchema } from '../../shared/schemas/training'
import { businessProfile, businessProfileSchema } from '../../shared/schemas/settings-business'
import { arrangeInsert, arrangeRemoval, arrangeReorder, dogReliability, evaluateReadiness, intervalInWords, loosenedCriteria, positionChanges, readinessSummary, windowStart, type ArrangeResult, type ProgrammeSlot, type ReadinessCriteria, type ReadinessState, type SessionForReadiness, type CountFrom } from '../../shared/utils/training'
import { scoreTrials } from '../../shared/utils/stats'
import { TRAINING_STAGES } from '../../shared/utils/enums'
import type { AuthUser } from '../utils/authz'
import type { DbOrTx, Tx } from '../utils/db'

type ClientRow = typeof clients.$inferSelect
type MilestoneRow = typeof clientMilestones.$inferSelect
type SessionRow = typeof trainingSessions.$inferSelect

export function readTrainingPolicy(db: DbOrTx = useDb()): Promise<ReadinessCriteria> {
  return readSetting(TRAINING_POLICY_KEY, criteriaSchema, TRAINING_POLICY_DEFAULTS, db)
}

function trainingRuleError(status: 409 | 422, message: string, fieldErrors?: Record<string, string>): never {
  throw createError({ statusCode: status, statusMessage: status === 409 ? 'Conflict' : 'Unprocessable Content', message, data: fieldErrors ? { fieldErrors } : undefined })
}

/** Today's calendar day in the user's time zone. */
export function trainingToday(timeZone: string, now = new Date()): string {
  try {
    return new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' }).format(now)
  }
  catch {
    return now.toISOString().slice(0, 10)
  }
}

// ---------------------------------------------------------------------------------------------------------------
// Access (404 for "does not exist" and "not yours")

export async function requireMilestoneAccess(event: H3Event, milestoneId: string) {
  const user = requireUser(event)
  const [row] = await useDb().select({ milestone: clientMilestones, client: clients }).from(clientMilestones)
    .innerJoin(clients, eq(clients.id, clientMilestones.clientId))
    .where(and(eq(clientMilestones.id, milestoneId), clientScope(user))).limit(1)
  if (!row) notFound('milestone')
  if (user.role === 'handler') throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: 'Only the trainer can sign off milestones or change their criteria.' })
  return { user, milestone: row.milestone, client: row.client }
}

export async function requireTrainingSessionAccess(event: H3Event, sessionId: string) {
  const user = requireUser(event)
  const [row] = await useDb().select({ session: trainingSessions, client: clients }).from(trainingSessions)
    .innerJoin(clients, eq(clients.id, trainingSessions.clientId))
    .where(and(eq(trainingSessions.id, sessionId), clientScope(user))).limit(1)
  if (!row) notFound('training session')
  return { user, session: row.session, client: row.client }
}

export async function requireTrialAccess(event: H3Event, trialId: string) {
  const user = requireUser(event)
  const [row] = await useDb().select({ trial: trainingTrials, session: trainingSessions }).from(trainingTrials)
    .innerJoin(trainingSessions, eq(trainingSessions.id, trainingTrials.sessionId))
    .innerJoin(clients, eq(clients.id, trainingTrials.clientId))
    .where(and(eq(trainingTrials.id, trialId), clientScope(user))).limit(1)
  if (!row) notFound('trial')
  return { user, trial: row.trial, session: row.session }
}

// ---------------------------------------------------------------------------------------------------------------
// Templates and programmes

export async function createClientProgramme(user: AuthUser, client: ClientRow, templateId: string) {
  return useDb().transaction(async (tx) => {
    const [template] = await tx.select().from(programmeTemplates).where(eq(programmeTemplates.id, templateId)).limit(1)
    if (!template) trainingRuleError(422, 'Choose one of the programme templates.', { templateId: 'Choose one of the programme templates.' })
    if (template.archivedAt) trainingRuleError(422, `The template “${template.name}” is archived. Choose another, or ask the office to bring it back.`, { templateId: 'This template is archived.' })
    const existing = await tx.select({ id: clientMilestones.id }).from(clientMilestones).where(eq(clientMilestones.clientId, client.id)).limit(1)
    if (existing.length) trainingRuleError(409, 'This client already has a programme. Adjust its milestones instead of starting another.')
    const rows = await tx.insert(clientMilestones).values(template.milestones.map((m, position) => ({
      clientId: client.id, position, name: m.name, handlerText: m.handlerText, measured: m.measured,
    }))).returning()
    await tx.update(clients).set({ programmeTemplateId: template.id }).where(eq(clients.id, client.id))
    await logAudit(tx, { actorId: user.id, action: 'programme.created', entityType: 'client', entityId: client.id, clientId: client.id, data: { name: template.name, templateId } })
    return rows.sort((a, b) => a.position - b.position)
  })
}

async function sessionsWithTrials(db: DbOrTx, clientId: string) {
  const [sessionRows, trialRows] = await Promise.all([
    db.select({ session: trainingSessions, runByName: users.name }).from(trainingSessions).leftJoin(users, eq(users.id, trainingSessions.runById))
      .where(eq(trainingSessions.clientId, clientId)).orderBy(asc(trainingSessions.day), asc(trainingSessions.createdAt)),
    db.select().from(trainingTrials).where(eq(trainingTrials.clientId, clientId)).orderBy(asc(trainingTrials.createdAt), asc(trainingTrials.id)),
  ])
  const bySession = new Map<string, (typeof trialRows)>()
  for (const t of trialRows) {
    const list = bySession.get(t.sessionId) ?? []
    list.push(t)
    bySession.set(t.sessionId, list)
  }
  return sessionRows.map(r => ({ ...r.session, runByName: r.runByName, trials: bySession.get(r.session.id) ?? [] }))
}
type SessionWithTrials = Awaited<ReturnType<typeof sessionsWithTrials>>[number]

const forReadiness = (sessions: SessionWithTrials[]): SessionForReadiness[] => sessions.map(s => ({ day: s.day, blind: s.blind, trials: s.trials, createdAt: s.createdAt }))

/** The latest sign-off among a client's milestones, as the moment and day readiness of the next one counts from. */
function lastSignOff(milestones: ReadonlyArray<{ confirmedAt: Date | null }>, timeZone: string): CountFrom | null {
  let at: Date | null = null
  for (const m of milestones) if (m.confirmedAt && (!at || m.confirmedAt > at)) at = m.confirmedAt
  return at ? { at, day: trainingToday(timeZone, at) } : null
}

/** A client's programme: milestones in order, the current one, and readiness figures for each measured milestone not yet signed off. */
export async function getClientProgramme(user: AuthUser, client: ClientRow) {
  const db = useDb()
  const [milestones, policy, sessions] = await Promise.all([
    db.select({ milestone: clientMilestones, confirmedByName: users.name }).from(clientMilestones).leftJoin(users, eq(users.id, clientMilestones.confirmedById))
      .where(eq(clientMilestones.clientId, client.id)).orderBy(asc(clientMilestones.position)),
    readTrainingPolicy(db),
    sessionsWithTrials(db, client.id),
  ])
  const today = trainingToday(user.timeZone)
  const current = milestones.find(m => !m.milestone.confirmedAt)?.milestone ?? null
  const countFrom = lastSignOff(milestones.map(m => m.milestone), user.timeZone)
  const rows = milestones.map(({ milestone: m, confirmedByName }) => {
    const criteria = m.measured ? (m.criteria ?? policy) : null
    return {
      ...m, confirmedByName, criteria, customCriteria: m.criteria !== null,
      readiness: criteria && !m.confirmedAt ? evaluateReadiness(criteria, forReadiness(sessions), today, undefined, countFrom) : null,
    }
  })
  return { milestones: rows, currentId: current?.id ?? null, defaults: policy, today, overall: scoreTrials(sessions.flatMap(s => s.trials)) }
}

async function checkCriteria(milestone: MilestoneRow, criteria: ReadinessCriteria | null) {
  if (!milestone.measured) trainingRuleError(422, 'This milestone is not measured on trials, so it has no criteria to set.')
  if (!criteria) return
  const policy = await readTrainingPolicy()
  const loose = loosenedCriteria(policy, criteria)
  if (loose.length) {
    trainingRuleError(422, 'A client\'s criteria can be stricter than the business\'s defaults, never looser.',
      Object.fromEntries(loose.map(k => [k, k === 'windowDays' ? `Use at most ${policy.windowDays} days (the default).` : `Use at least ${policy[k]} (the default).`])))
  }
}

export async function setMilestoneCriteria(user: AuthUser, milestone: MilestoneRow, criteria: ReadinessCriteria | null) {
  return updateMilestone(user, milestone, { criteria })
}

/** Renames a milestone, edits its text for the handler and/or tightens its criteria. A signed-off milestone stays as it was signed. */
export async function updateMilestone(user: AuthUser, milestone: MilestoneRow, input: MilestoneUpdateInput) {
  if (input.criteria !== undefined) await checkCriteria(milestone, input.criteria)
  return useDb().transaction(async (tx) => {
    const [fresh] = await tx.select().from(clientMilestones).where(eq(clientMilestones.id, milestone.id)).limit(1)
    if (!fresh) notFound('milestone')
    if (fresh.confirmedAt) trainingRuleError(409, `"${fresh.name}" was signed off: it stays as it was signed. Add a new milestone instead.`)
    const changes: Partial<MilestoneRow> = {}
    if (input.name !== undefined && input.name !== fresh.name) changes.name = input.name
    if (input.handlerText !== undefined && input.handlerText !== fresh.handlerText) changes.handlerText = input.handlerText
    if (input.criteria !== undefined) changes.criteria = input.criteria
    if (!Object.keys(changes).length) return fresh
    const [row] = await tx.update(clientMilestones).set({ ...changes, updatedAt: new Date() }).where(eq(clientMilestones.id, fresh.id)).returning()
    if (changes.name) await logAudit(tx, { actorId: user.id, action: 'milestone.renamed', entityType: 'milestone', entityId: fresh.id, clientId: fresh.clientId, data: { name: changes.name, from: fresh.name, to: changes.name } })
    if (changes.handlerText) await logAudit(tx, { actorId: user.id, action: 'milestone.text-edited', entityType: 'milestone', entityId: fresh.id, clientId: fresh.clientId, data: { name: row!.name, before: fresh.handlerText, after: changes.handlerText } })
    if ('criteria' in changes) await logAudit(tx, { actorId: user.id, action: 'milestone.criteria-set', entityType: 'milestone', entityId: fresh.id, clientId: fresh.clientId, data: { name: row!.name, before: fresh.criteria, after: input.criteria } })
    return row!
  })
}

// Positions are unique per client (client_milestones_position_unique), so moved rows first go to a temporary
// negative place (-1 - new position, free because real positions are 0 or more), then to their new place.
async function applyOrder(tx: Tx, clientId: string, changes: [string, number][]) {
  for (const [id, position] of changes) {
    await tx.update(clientMilestones).set({ position: -1 - position }).where(and(eq(clientMilestones.id, id), eq(clientMilestones.clientId, clientId)))
  }
  if (changes.length) {
    await tx.update(clientMilestones).set({ position: sql`-1 - ${clientMilestones.position}`, updatedAt: new Date() })
      .where(and(eq(clientMilestones.clientId, clientId), sql`${clientMilestones.position} < 0`))
  }
}

async function programmeSlots(tx: Tx, clientId: string): Promise<ProgrammeSlot[]> {
  const rows = await tx.select({ id: clientMilestones.id, position: clientMilestones.position, confirmedAt: clientMilestones.confirmedAt })
    .from(clientMilestones).where(eq(clientMilestones.clientId, clientId)).orderBy(asc(clientMilestones.position))
  return rows.map(r => ({ id: r.id, position: r.position, confirmed: r.confirmedAt !== null }))
}

function orderOrRefuse(result: ArrangeResult): string[] {
  if (!result.ok) trainingRuleError(result.status, result.message, result.field ? { [result.field]: result.message } : undefined)
  return result.order
}

/** Adds a milestone to a client's programme at a place after the signed-off ones. */
export async function addClientMilestone(user: AuthUser, client: ClientRow, input: MilestoneAddInput) {
  return useDb().transaction(async (tx) => {
    const slots = await programmeSlots(tx, client.id)
    if (!slots.length) trainingRuleError(409, 'This client has no programme yet. Start it from a template first.')
    const newId = crypto.randomUUID()
    const order = orderOrRefuse(arrangeInsert(slots, input.position, newId))
    await applyOrder(tx, client.id, positionChanges(slots, order).filter(([id]) => id !== newId))
    const [row] = await tx.insert(clientMilestones).values({
      id: newId, clientId: client.id, position: order.indexOf(newId), name: input.name, handlerText: input.handlerText, measured: input.measured,
    }).returning()
    await logAudit(tx, { actorId: user.id, action: 'milestone.added', entityType: 'milestone', entityId: newId, clientId: client.id, data: { name: input.name, position: row!.position } })
    return row!
  })
}

/** Removes a milestone not yet signed off that nothing refers to (homework set for it). */
export async function removeClientMilestone(user: AuthUser, milestone: MilestoneRow) {
  return useDb().transaction(async (tx) => {
    const slots = await programmeSlots(tx, milestone.clientId)
    const order = orderOrRefuse(arrangeRemoval(slots, milestone.id))
    const [homework] = await tx.select({ n: sql<number>`count(*)` }).from(homeworkAssignments).where(eq(homeworkAssignments.milestoneId, milestone.id))
    if (Number(homework?.n ?? 0) > 0) {
      trainingRuleError(409, `Homework is set for "${milestone.name}" (${homework!.n} assignment${Number(homework!.n) === 1 ? '' : 's'}). Move or cancel that homework first, or rename the milestone instead.`)
    }
    await tx.delete(clientMilestones).where(eq(clientMilestones.id, milestone.id))
    const rest = slots.filter(s => s.id !== milestone.id)
    await applyOrder(tx, milestone.clientId, positionChanges(rest, order))
    await logAudit(tx, { actorId: user.id, action: 'milestone.removed', entityType: 'milestone', entityId: milestone.id, clientId: milestone.clientId, data: { name: milestone.name, position: milestone.position } })
    return { id: milestone.id }
  })
}

/** Puts the milestones not yet signed off in a new order (the signed-off ones stay first). */
export async function reorderClientMilestones(user: AuthUser, client: ClientRow, ids: string[]) {
  return useDb().transaction(async (tx) => {
    const slots = await programmeSlots(tx, client.id)
    if (!slots.length) trainingRuleError(409, 'This client has no programme yet. Start it from a template first.')
    const order = orderOrRefuse(arrangeReorder(slots, ids))
    const changes = positionChanges(slots, order)
    await applyOrder(tx, client.id, changes)
    if (changes.length) {
      const names = await tx.select({ id: clientMilestones.id, name: clientMilestones.name }).from(clientMilestones).where(eq(clientMilestones.clientId, client.id)).orderBy(asc(clientMilestones.position))
      await logAudit(tx, { actorId: user.id, action: 'programme.reordered', entityType: 'client', entityId: client.id, clientId: client.id, data: { after: names.map(n => n.name) } })
    }
    return { moved: changes.length }
  })
}

/** The trainer signs a milestone off (never automatic). Criteria unmet need a written reason. E-mails the household. */
export async function confirmMilestone(user: AuthUser, milestone: MilestoneRow, client: ClientRow, reason: string | null) {
  const db = useDb()
  const programme = await getClientProgramme(user, client)
  const row = programme.milestones.find(m => m.id === milestone.id)!
  if (row.confirmedAt) trainingRuleError(409, `"${row.name}" was already signed off.`)
  if (programme.currentId !== row.id) {
    const current = programme.milestones.find(m => m.id === programme.currentId)
    trainingRuleError(409, `Sign off the milestones in order: "${current?.name}" comes first.`)
  }
  const unmet = row.readiness?.criteria.filter(c => !c.met) ?? []
  if (unmet.length && !reason) {
    trainingRuleError(422, `Criteria not met yet (${unmet.map(c => c.stillNeeded).join('; ')}). Write why you sign it off anyway.`, { reason: 'Write why you sign this milestone off with criteria unmet.' })
  }
  const next = programme.milestones.find(m => m.position > row.position && !m.confirmedAt) ?? null
  return db.transaction(async (tx) => {
    const [updated] = await tx.update(clientMilestones).set({ confirmedAt: new Date(), confirmedById: user.id, confirmReason: reason })
      .where(and(eq(clientMilestones.id, row.id), isNull(clientMilestones.confirmedAt))).returning()
    if (!updated) trainingRuleError(409, `"${row.name}" was just signed off by someone else.`)
    await logAudit(tx, {
      actorId: user.id, action: 'milestone.confirmed', entityType: 'milestone', entityId: row.id, clientId: client.id,
      data: { name: row.name, reason, unmet: unmet.map(c => c.key) },
    })
    const handlers = await householdHandlers(tx, client.id)
    for (const h of handlers) {
      await queueEmail(tx, { to: h.email, ...milestoneEmail(h.name, client, row, next), dedupeKey: `milestone:${row.id}:${h.email}` })
    }
    return updated
  })
}

function milestoneEmail(name: string, client: ClientRow, row: { name: string, handlerText: string, readiness: ReturnType<typeof evaluateReadiness> | null }, next: { name: string, handlerText: string } | null) {
  const figures = row.readiness
    ? [`In training from ${row.readiness.from} to ${row.readiness.to} the dog found the target in ${intervalInWords(row.readiness.score.sensitivity, 'trials with a target yet')} It stayed quiet on line-ups with no target in ${intervalInWords(row.readiness.score.specificity, 'blank trials yet')}`]
    : []
  return composeEmail({
    subject: `Milestone reached: ${row.name}`,
    greeting: `Hello ${name},`,
    paragraphs: [
      `Your trainer has signed off a milestone in the ${client.householdName} programme: ${row.name}.`,
      `What your dog can now do: ${row.handlerText}`,
      ...figures,
      next ? `What comes next: ${next.name}. ${next.handlerText}` : 'This was the last milestone of the programme.',
      'A reminder: an alert dog supplements your medical care and never replaces it. Keep following your clinician\'s advice, whatever the dog does.',
    ],
    action: { label: 'See your dog\'s progress', url: `${useRuntimeConfig().appUrl}/handler/training/${client.id}` },
  })
}

// ---------------------------------------------------------------------------------------------------------------
// Sessions and trials

export async function createTrainingSession(user: AuthUser, client: ClientRow, input: SessionCreateInput) {
  const today = trainingToday(user.timeZone)
  if (input.day > today) trainingRuleError(422, 'A session cannot be in the future. Check the date.', { day: `A session cannot be after today (${today}).` })
  const runBy = user.role === 'handler' ? 'handler' : (input.runBy ?? 'trainer')
  return useDb().transaction(async (tx) => {
    const [dog] = await tx.select({ id: dogs.id }).from(dogs).where(and(eq(dogs.id, input.dogId), eq(dogs.clientId, client.id))).limit(1)
    if (!dog) trainingRuleError(422, 'Choose this household\'s dog.', { dogId: 'That dog is not in this client file.' })
    const { trials, ...rest } = input
    const [session] = await tx.insert(trainingSessions).values({ ...rest, runBy, runById: user.id, clientId: client.id }).returning()
    const trialRows = trials.length
      ? await tx.insert(trainingTrials).values(trials.map(t => ({ ...t, sessionId: session!.id, clientId: client.id }))).returning()
      : []
    await logAudit(tx, { actorId: user.id, action: 'training-session.logged', entityType: 'training-session', entityId: session!.id, clientId: client.id, data: { name: `${rest.stage} session on ${rest.day}`, trials: trials.length } })
    return { ...session!, trials: trialRows }
  })
}

/**
 * Adds one trial. With an `entryKey` the same trial sent again (the pad's retry queue, a reload) is not stored twice:
 * the stored row comes back with `created: false`. The same key with a different outcome is refused (409).
 */
export async function addTrial(user: AuthUser, session: SessionRow, input: TrialInput) {
  return useDb().transaction(async (tx) => {
    const [trial] = await tx.insert(trainingTrials).values({ ...input, sessionId: session.id, clientId: session.clientId })
      .onConflictDoNothing({ target: [trainingTrials.sessionId, trainingTrials.entryKey] }).returning()
    if (trial) return { trial, created: true }
    const [existing] = await tx.select().from(trainingTrials).where(and(eq(trainingTrials.sessionId, session.id), eq(trainingTrials.entryKey, input.entryKey!))).limit(1)
    if (!existing) trainingRuleError(409, 'That trial could not be stored; send it again.')
    if (existing.stations !== input.stations || existing.targetStation !== input.targetStation || existing.indicatedStation !== input.indicatedStation) {
      trainingRuleError(409, 'A different trial was already stored under this key. Tap the trial again to record it anew.')
    }
    return { trial: existing, created: false }
  })
}

export async function deleteTrial(user: AuthUser, trial: typeof trainingTrials.$inferSelect) {
  return useDb().transaction(async (tx) => {
    await tx.delete(trainingTrials).where(eq(trainingTrials.id, trial.id))
    await logAudit(tx, { actorId: user.id, action: 'training-trial.deleted', entityType: 'training-session', entityId: trial.sessionId, clientId: trial.clientId, data: { trial } })
    return trial
  })
}

/** A client's sessions, newest first, each with its trials, score and the samples it used (uses recorded with the session's id). */
export async function listTrainingSessions(client: ClientRow) {
  const db = useDb()
  const [sessions, uses] = await Promise.all([
    sessionsWithTrials(db, client.id),
    db.select({ sessionRef: sampleUses.sessionRef, bagCode: samples.bagCode, kind: samples.kind }).from(sampleUses).innerJoin(samples, eq(samples.id, sampleUses.sampleId))
      .where(eq(sampleUses.clientId, client.id)),
  ])
  return sessions.reverse().map(s => ({
    ...s, score: scoreTrials(s.trials), samples: uses.filter(u => u.sessionRef === s.id).map(u => ({ bagCode: u.bagCode, kind: u.kind })),
  }))
}

export async function getTrainingSession(session: SessionRow) {
  const trials = await useDb().select().from(trainingTrials).where(eq(trainingTrials.sessionId, session.id)).orderBy(asc(trainingTrials.createdAt), asc(trainingTrials.id))
  return { ...session, trials, score: scoreTrials(trials) }
}

// ---------------------------------------------------------------------------------------------------------------
// Roster: the current milestone and its readiness, for one page of clients in three queries (milestones, the
// policy, the trials of the rolling windows), whatever the page size.

export interface TrainingRosterValue {
  current: string | null
  done: number
  total: number
  /** Readiness of the current milestone: 'unmeasured' when it has no measured criteria (or all are reached). */
  readiness: ReadinessState
  /** The first thing still needed, e.g. "8 more blind trials"; null when ready or unmeasured. */
  stillNeeded: string | null
  unmet: number
}

export async function trainingRosterStatus(clientIds: string[], timeZone?: string): Promise<Map<string, TrainingRosterValue>> {
  const out = new Map<string, TrainingRosterValue>()
  if (!clientIds.length) return out
  const db = useDb()
  const [milestones, policy, business] = await Promise.all([
    db.select({ clientId: clientMilestones.clientId, name: clientMilestones.name, measured: clientMilestones.measured, criteria: clientMilestones.criteria, confirmedAt: clientMilestones.confirmedAt })
      .from(clientMilestones).where(inArray(clientMilestones.clientId, clientIds)).orderBy(asc(clientMilestones.clientId), asc(clientMilestones.position)),
    readTrainingPolicy(db),
    timeZone ? Promise.resolve({ timeZone }) : readSetting('business', businessProfileSchema, businessProfile.defaults, db),
  ])
  const today = trainingToday(business.timeZone)
  const byClient = new Map<string, { done: number, total: number, current: (typeof milestones)[number] | null, signedOff: Array<{ confirmedAt: Date | null }> }>()
  for (const m of milestones) {
    const c = byClient.get(m.clientId) ?? { done: 0, total: 0, current: null, signedOff: [] }
    c.total++
    if (m.confirmedAt) { c.done++; c.signedOff.push(m) }
    else c.current ??= m
    byClient.set(m.clientId, c)
  }
  // Only clients whose current milestone is measured need trials, and only from the widest of their windows.
  const measured = [...byClient.entries()].filter(([, c]) => c.current?.measured).map(([id, c]) => ({ id, criteria: c.current!.criteria ?? policy }))
  const sessions = new Map<string, Map<string, SessionForReadiness>>()
  if (measured.length) {
    const from = windowStart(today, Math.max(...measured.map(m => m.criteria.windowDays)))
    const rows = await db.select({
      clientId: trainingSessions.clientId, sessionId: trainingSessions.id, day: trainingSessions.day, blind: trainingSessions.blind, createdAt: trainingSessions.createdAt,
      stations: trainingTrials.stations, targetStation: trainingTrials.targetStation, indicatedStation: trainingTrials.indicatedStation,
    }).from(trainingSessions).leftJoin(trainingTrials, eq(trainingTrials.sessionId, trainingSessions.id))
      .where(and(inArray(trainingSessions.clientId, measured.map(m => m.id)), gte(trainingSessions.day, from), lte(trainingSessions.day, today)))
    for (const r of rows) {
      const list = sessions.get(r.clientId) ?? new Map<string, SessionForReadiness>()
      const session = list.get(r.sessionId) ?? { day: r.day, blind: r.blind, trials: [], createdAt: r.createdAt }
      if (r.stations !== null) session.trials.push({ stations: r.stations, targetStation: r.targetStation, indicatedStation: r.indicatedStation })
      list.set(r.sessionId, session)
      sessions.set(r.clientId, list)
    }
  }
  const criteriaOf = new Map(measured.map(m => [m.id, m.criteria]))
  for (const [clientId, c] of byClient) {
    const criteria = criteriaOf.get(clientId)
    const summary = readinessSummary(criteria ? evaluateReadiness(criteria, [...(sessions.get(clientId)?.values() ?? [])], today, undefined, lastSignOff(c.signedOff, business.timeZone)) : null)
    out.set(clientId, { current: c.current?.name ?? null, done: c.done, total: c.total, readiness: summary.state, stillNeeded: summary.stillNeeded, unmet: summary.unmet })
  }
  return out
}

export async function updateProgrammeTemplate(user: AuthUser, templateId: string, input: TemplateUpdateInput) {
  return useDb().transaction(async (tx) => {
    const [before] = await tx.select().from(programmeTemplates).where(eq(programmeTemplates.id, templateId)).limit(1)
    if (!before) notFound('programme template')
    const [row] = await tx.update(programmeTemplates).set({ name: input.name, milestones: input.milestones }).where(eq(programmeTemplates.id, templateId)).returning()
    await logAudit(tx, { actorId: user.id, action: 'programme-template.updated', entityType: 'programme-template', entityId: templateId, data: { name: input.name, before: before.milestones.map(m => m.name), after: input.milestones.map(m => m.name) } })
    return row!
  })
}

/** The training log as CSV: one line per trial with its session, its outcome class, and the session's score. */
export async function trainingLogCsv(client: ClientRow) {
  const sessions = (await listTrainingSessions(client)).reverse()
  const lines = [['session_day', 'stage', 'place', 'run_by', 'blind', 'trial', 'stations', 'target_station', 'indicated_station', 'outcome', 'latency_seconds', 'session_sensitivity', 'session_specificity', 'notes']]
  const outcome = (t: { targetStation: number | null, indicatedStation: number | null }) => t.targetStation === null
    ? (t.indicatedStation === null ? 'correct rejection' : 'false alert')
    : t.indicatedStation === null ? 'miss' : t.indicatedStation === t.targetStation ? 'hit' : 'wrong station'
  const rate = (i: { estimate: number } | null) => (i ? i.estimate.toFixed(3) : '')
  for (const s of sessions) {
    s.trials.forEach((t, i) => lines.push([s.day, s.stage, s.place ?? '', s.runBy, s.blind ? 'yes' : 'no', String(i + 1), String(t.stations), t.targetStation === null ? 'blank' : String(t.targetStation), t.indicatedStation === null ? 'none' : String(t.indicatedStation), outcome(t), t.latencySeconds === null ? '' : String(t.latencySeconds), rate(s.score.sensitivity), rate(s.score.specificity), t.notes ?? '']))
  }
  return toCsv(lines)
}

// ---------------------------------------------------------------------------------------------------------------
// The session list across clients (the trainer's own, the admin's all), paged and filtered in SQL, with each
// session's outcome counts (the same classes as scoreTrials in shared/utils/stats.ts).

export async function listSessionsAcrossClients(user: AuthUser, q: SessionListQuery) {
  const db = useDb()
  const filters: (SQL | undefined)[] = [clientScope(user)]
  if (q.clientId) filters.push(eq(trainingSessions.clientId, q.clientId))
  if (q.dogId) filters.push(eq(trainingSessions.dogId, q.dogId))
  if (q.runBy) filters.push(eq(trainingSessions.runBy, q.runBy))
  if (q.blind) filters.push(eq(trainingSessions.blind, q.blind === 'yes'))
  if (q.from) filters.push(gte(trainingSessions.day, q.from))
  if (q.to) filters.push(lte(trainingSessions.day, q.to))
  if (q.q) {
    const pattern = `%${q.q.replace(/[\\%_]/g, c => `\\${c}`)}%`
    filters.push(or(sql`${clients.householdName} like ${pattern} escape '\\'`, sql`${dogs.name} like ${pattern} escape '\\'`, sql`${trainingSessions.place} like ${pattern} escape '\\'`))
  }
  const where = and(...filters)
  const t = trainingTrials
  const [rows, [total]] = await Promise.all([
    db.select({
      id: trainingSessions.id, day: trainingSessions.day, stage: trainingSessions.stage, place: trainingSessions.place, blind: trainingSessions.blind,
      runBy: trainingSessions.runBy, runByName: users.name, clientId: clients.id, householdName: clients.householdName, dogId: dogs.id, dogName: dogs.name,
      trials: sql<number>`(select count(*) from ${t} where ${t.sessionId} = ${trainingSessions.id})`,
      hits: sql<number>`(select count(*) from ${t} where ${t.sessionId} = ${trainingSessions.id} and ${t.targetStation} is not null and ${t.indicatedStation} = ${t.targetStation})`,
      misses: sql<number>`(select count(*) from ${t} where ${t.sessionId} = ${trainingSessions.id} and ${t.targetStation} is not null and ${t.indicatedStation} is null)`,
      falseAlerts: sql<number>`(select count(*) from ${t} where ${t.sessionId} = ${trainingSessions.id} and ${t.indicatedStation} is not null and (${t.targetStation} is null or ${t.indicatedStation} <> ${t.targetStation}))`,
      correctRejections: sql<number>`(select count(*) from ${t} where ${t.sessionId} = ${trainingSessions.id} and ${t.targetStation} is null and ${t.indicatedStation} is null)`,
    }).from(trainingSessions)
      .innerJoin(clients, eq(clients.id, trainingSessions.clientId))
      .innerJoin(dogs, eq(dogs.id, trainingSessions.dogId))
      .leftJoin(users, eq(users.id, trainingSessions.runById))
      .where(where).orderBy(desc(trainingSessions.day), desc(trainingSessions.createdAt), asc(trainingSessions.id))
      .limit(q.pageSize).offset((q.page - 1) * q.pageSize),
    db.select({ n: sql<number>`count(*)` }).from(trainingSessions)
      .innerJoin(clients, eq(clients.id, trainingSessions.clientId))
      .innerJoin(dogs, eq(dogs.id, trainingSessions.dogId)).where(where),
  ])
  return { rows, total: Number(total?.n ?? 0), page: q.page, pageSize: q.pageSize }
}

// ---------------------------------------------------------------------------------------------------------------
// A dog's reliability over all its sessions.

export async function getDogReliability(dog: typeof dogs.$inferSelect, client: ClientRow) {
  const db = useDb()
  const [sessionRows, trialRows] = await Promise.all([
    db.select().from(trainingSessions).where(eq(trainingSessions.dogId, dog.id)).orderBy(asc(trainingSessions.day), asc(trainingSessions.createdAt)),
    db.select({ sessionId: trainingTrials.sessionId, stations: trainingTrials.stations, targetStation: trainingTrials.targetStation, indicatedStation: trainingTrials.indicatedStation, latencySeconds: trainingTrials.latencySeconds })
      .from(trainingTrials).innerJoin(trainingSessions, eq(trainingSessions.id, trainingTrials.sessionId)).where(eq(trainingSessions.dogId, dog.id)),
  ])
  const bySession = new Map<string, (typeof trialRows)>()
  for (const tr of trialRows) bySession.set(tr.sessionId, [...(bySession.get(tr.sessionId) ?? []), tr])
  const sessions = sessionRows.map(s => ({ id: s.id, day: s.day, stage: s.stage, blind: s.blind, runBy: s.runBy, place: s.place, trials: bySession.get(s.id) ?? [] }))
  return {
    dog: { id: dog.id, name: dog.name },
    client: { id: client.id, householdName: client.householdName },
    reliability: dogReliability(sessions, TRAINING_STAGES),
    // Newest first, as the client's session log (the charts put them in date order).
    sessions: sessions.reverse().map(s => ({ ...s, score: scoreTrials(s.trials) })),
  }
}
