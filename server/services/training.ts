// Training: programme templates, each client's programme with its readiness figures and sign-off (and the milestone
// e-mail to the household through the outbox), sessions and trials, and the roster column. Pure rules live in
// shared/utils/training.ts and shared/utils/stats.ts.
import type { H3Event } from 'h3'
import { and, asc, eq, inArray, isNull, sql } from 'drizzle-orm'
import { clientHandlers, clientMilestones, clients, dogs, programmeTemplates, sampleUses, samples, trainingSessions, trainingTrials, users } from '../database/schema'
import type { SessionCreateInput, TemplateUpdateInput, TrialInput } from '../../shared/schemas/training'
import { TRAINING_POLICY_DEFAULTS, TRAINING_POLICY_KEY } from '../../shared/schemas/settings-training'
import { criteriaSchema } from '../../shared/schemas/training'
import { evaluateReadiness, intervalInWords, loosenedCriteria, type ReadinessCriteria, type SessionForReadiness } from '../../shared/utils/training'
import { scoreTrials } from '../../shared/utils/stats'
import type { AuthUser } from '../utils/authz'
import type { DbOrTx } from '../utils/db'

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

export function listProgrammeTemplates() {
  return useDb().select().from(programmeTemplates).orderBy(sql`${programmeTemplates.isDefault} desc`, asc(programmeTemplates.name))
}

export async function createClientProgramme(user: AuthUser, client: ClientRow, templateId: string) {
  return useDb().transaction(async (tx) => {
    const [template] = await tx.select().from(programmeTemplates).where(eq(programmeTemplates.id, templateId)).limit(1)
    if (!template) trainingRuleError(422, 'Choose one of the programme templates.', { templateId: 'Choose one of the programme templates.' })
    const existing = await tx.select({ id: clientMilestones.id }).from(clientMilestones).where(eq(clientMilestones.clientId, client.id)).limit(1)
    if (existing.length) trainingRuleError(409, 'This client already has a programme. Adjust its milestones instead of starting another.')
    const rows = await tx.insert(clientMilestones).values(template.milestones.map((m, position) => ({
      clientId: client.id, position, name: m.name, handlerText: m.handlerText, measured: m.measured,
    }))).returning()
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

const forReadiness = (sessions: SessionWithTrials[]): SessionForReadiness[] => sessions.map(s => ({ day: s.day, blind: s.blind, trials: s.trials }))

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
  const rows = milestones.map(({ milestone: m, confirmedByName }) => {
    const criteria = m.measured ? (m.criteria ?? policy) : null
    return {
      ...m, confirmedByName, criteria, customCriteria: m.criteria !== null,
      readiness: criteria && !m.confirmedAt ? evaluateReadiness(criteria, forReadiness(sessions), today) : null,
    }
  })
  return { milestones: rows, currentId: current?.id ?? null, defaults: policy, today, overall: scoreTrials(sessions.flatMap(s => s.trials)) }
}

export async function setMilestoneCriteria(user: AuthUser, milestone: MilestoneRow, criteria: ReadinessCriteria | null) {
  if (!milestone.measured) trainingRuleError(422, 'This milestone is not measured on trials, so it has no criteria to set.')
  const policy = await readTrainingPolicy()
  if (criteria) {
    const loose = loosenedCriteria(policy, criteria)
    if (loose.length) {
      trainingRuleError(422, 'A client\'s criteria can be stricter than the business\'s defaults, never looser.',
        Object.fromEntries(loose.map(k => [k, k === 'windowDays' ? `Use at most ${policy.windowDays} days (the default).` : `Use at least ${policy[k]} (the default).`])))
    }
  }
  return useDb().transaction(async (tx) => {
    const [row] = await tx.update(clientMilestones).set({ criteria }).where(eq(clientMilestones.id, milestone.id)).returning()
    await logAudit(tx, { actorId: user.id, action: 'milestone.criteria-set', entityType: 'milestone', entityId: milestone.id, clientId: milestone.clientId, data: { name: milestone.name, before: milestone.criteria, after: criteria } })
    return row!
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
    const handlers = await tx.select({ email: users.email, name: users.name }).from(clientHandlers).innerJoin(users, eq(users.id, clientHandlers.userId)).where(eq(clientHandlers.clientId, client.id))
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

export async function addTrial(user: AuthUser, session: SessionRow, input: TrialInput) {
  return useDb().transaction(async (tx) => {
    const [trial] = await tx.insert(trainingTrials).values({ ...input, sessionId: session.id, clientId: session.clientId }).returning()
    return trial!
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
// Roster: the current milestone, for one page of clients in one query.

export interface TrainingRosterValue { current: string | null, done: number, total: number }

export async function trainingRosterStatus(clientIds: string[]): Promise<Map<string, TrainingRosterValue>> {
  const out = new Map<string, TrainingRosterValue>()
  if (!clientIds.length) return out
  const rows = await useDb().select({
    clientId: clientMilestones.clientId,
    total: sql<number>`count(*)`,
    done: sql<number>`sum(case when ${clientMilestones.confirmedAt} is not null then 1 else 0 end)`,
    current: sql<string | null>`(select m2.name from client_milestones m2 where m2.client_id = "client_milestones"."client_id" and m2.confirmed_at is null order by m2.position limit 1)`,
  }).from(clientMilestones).where(inArray(clientMilestones.clientId, clientIds)).groupBy(clientMilestones.clientId)
  for (const r of rows) out.set(r.clientId, { current: r.current, done: Number(r.done), total: Number(r.total) })
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

const csvCell = (v: unknown) => {
  const s = v === null || v === undefined ? '' : String(v)
  // Quote per RFC 4180; a leading = + - @ is prefixed with ' so spreadsheets do not run it as a formula (OWASP, "CSV Injection").
  const safe = /^[=+\-@\t\r]/.test(s) ? `'${s}` : s
  return /[",\n\r]/.test(safe) ? `"${safe.replace(/"/g, '""')}"` : safe
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
  return `${lines.map(l => l.map(csvCell).join(',')).join('\r\n')}\r\n`
}
