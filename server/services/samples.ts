// The scent-sample bank: collections, packing, uses, the per-household stock summary and the restocking reminder.
// Every rule comes from shared/utils/samples.ts with the business's policy (setting 'samples'); each change runs in
// one transaction with its audit entry and the refreshed stock status (and, when stock turns low, the reminder).
import type { H3Event } from 'h3'
import { and, asc, eq, inArray, isNull, lt, or, sql } from 'drizzle-orm'
import {
  clientHandlers, clients, sampleBankSettings, sampleBankStatus, sampleContainers, sampleOuterBags, sampleUses, samples, users,
} from '../database/schema'
import {
  DEFAULT_SAMPLE_POLICY, EXPOSURES, bagState, bankSummary, checkCollection, checkPacking, checkUse, checkUseReturn,
  discardReasonOf, restockTransition, stockForecast, stockRosterValue, targetTiming, uniqueBagCode, useDiscards,
  type Bag, type CollectionAnswers, type Problem, type SampleRosterValue, type Sample, type SamplePolicy, type SampleState, type SampleUse, type StockForecast,
} from '../../shared/utils/samples'
import { isPhoneBagCode } from '../../shared/utils/bag-codes'
import { SAMPLE_POLICY_KEY, samplePolicySchema } from '../../shared/schemas/settings-samples'
import { businessProfileSchema, businessProfile } from '../../shared/schemas/settings-business'
import type {
  CollectionAnswersInput, ContainerCreateInput, SampleAnswersInput, SampleCreateInput, SampleSettingsInput, SampleStoreInput, UseCloseInput, UseCreateInput,
} from '../../shared/schemas/samples'
import type { AuthUser } from '../utils/authz'
import type { DbOrTx, Tx } from '../utils/db'

type SampleRow = typeof samples.$inferSelect
type UseRow = typeof sampleUses.$inferSelect
type ClientRow = typeof clients.$inferSelect

export function samplePolicy(db: DbOrTx = useDb()): Promise<SamplePolicy> {
  return readSetting(SAMPLE_POLICY_KEY, samplePolicySchema, { ...DEFAULT_SAMPLE_POLICY }, db)
}

/** A 422 naming the broken rules: the message lists them in plain words, data.rules gives their codes. */
export function sampleRuleError(problems: Problem[], fieldErrors: Record<string, string> = {}): never {
  throw createError({
    statusCode: 422,
    statusMessage: 'Unprocessable Content',
    message: problems.map(p => p.message).join(' '),
    data: { rules: problems.map(p => p.rule), problems, fieldErrors },
  })
}

function refuseHandler(user: AuthUser, what: string) {
  if (user.role === 'handler') throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: `Only the trainer can ${what}.` })
}

/** A sample whose household the user may see, or 404 (the same for "does not exist" and "not yours"). */
export async function requireSampleAccess(event: H3Event, sampleId: string) {
  const user = requireUser(event)
  const [row] = await useDb().select({ sample: samples, client: clients }).from(samples)
    .innerJoin(clients, eq(clients.id, samples.clientId))
    .where(and(eq(samples.id, sampleId), clientScope(user))).limit(1)
  if (!row) notFound('sample')
  return { user, sample: row.sample, client: row.client }
}

export async function requireSampleUseAccess(event: H3Event, useId: string) {
  const user = requireUser(event)
  const [row] = await useDb().select({ use: sampleUses, sample: samples, client: clients }).from(sampleUses)
    .innerJoin(samples, eq(samples.id, sampleUses.sampleId))
    .innerJoin(clients, eq(clients.id, samples.clientId))
    .where(and(eq(sampleUses.id, useId), clientScope(user))).limit(1)
  if (!row) notFound('sample use')
  return { user, use: row.use, sample: row.sample, client: row.client }
}

export async function requireOuterBagAccess(event: H3Event, outerBagId: string) {
  const user = requireUser(event)
  const [row] = await useDb().select({ bag: sampleOuterBags, client: clients }).from(sampleOuterBags)
    .innerJoin(clients, eq(clients.id, sampleOuterBags.clientId))
    .where(and(eq(sampleOuterBags.id, outerBagId), clientScope(user))).limit(1)
  if (!row) notFound('outer bag')
  return { user, bag: row.bag, client: row.client }
}

// ---------------------------------------------------------------------------------------------------------------
// Pure shapes

/** The pure-logic view of a row. A collection still waiting for its answers is treated as compromised. */
function pureSample(row: SampleRow): Sample {
  return {
    id: row.id, kind: row.kind, collectedAt: row.collectedAt,
    compromised: row.compromised || row.answersCompletedAt === null,
    overrideReason: row.answersCompletedAt === null ? null : row.overrideReason, discardedAt: row.discardedAt,
  }
}
function pureUse(row: UseRow): SampleUse {
  return { sampleId: row.sampleId, outAt: row.outAt, backAt: row.backAt, discarded: row.discarded, stage: row.stage, overLimit: row.overLimit }
}
/** A household's sample settings: whether the trainer keeps flagged targets out of training. */
async function excludesFlaggedTargets(db: DbOrTx, clientId: string) {
  const [row] = await db.select({ v: sampleBankSettings.excludeFlaggedTargets }).from(sampleBankSettings).where(eq(sampleBankSettings.clientId, clientId)).limit(1)
  return row?.v ?? false
}
function timingOf(row: SampleRow, policy: SamplePolicy) {
  return targetTiming({ kind: row.kind, collectedAt: row.collectedAt, firstSymptomsAt: row.firstSymptomsAt, medicationBefore: row.medicationBefore }, policy)
}
/** The bag as bagState sees it: the sample as collected, whether it is in the freezer, answered, and kept out. */
function pureBag(row: SampleRow, policy: SamplePolicy, excludeFlagged: boolean): Bag {
  return {
    id: row.id, kind: row.kind, collectedAt: row.collectedAt, compromised: row.compromised, overrideReason: row.overrideReason,
    discardedAt: row.discardedAt, stored: row.outerBagId !== null, answersComplete: row.answersCompletedAt !== null,
    keptOut: excludeFlagged && timingOf(row, policy).flagged,
  }
}

function answersToJson(a: CollectionAnswersInput): Record<string, unknown> {
  const out: Record<string, unknown> = { unknown: a.unknown, washedHandsUnscented: a.washedHandsUnscented }
  for (const k of EXPOSURES) out[k] = a[k] === undefined ? undefined : a[k] === null ? null : a[k]!.toISOString()
  return out
}

function collectionOf(kind: SampleRow['kind'], collectedAt: Date, firstSymptomsAt: Date | null | undefined, rolls: number, a?: CollectionAnswersInput): CollectionAnswers {
  const answers: CollectionAnswers = { kind, collectedAt, firstSymptomsAt: firstSymptomsAt ?? null, rolls, washedHandsUnscented: a?.washedHandsUnscented ?? false }
  if (a) {
    for (const k of EXPOSURES) if (a[k] !== undefined) answers[k] = a[k]
    answers.unknown = a.unknown
  }
  return answers
}

// Quick saves skip the checklist: only the collection's own facts (time, rolls, first symptoms) must be right.
const EXPOSURE_RULES = new Set(['fasting-food', 'fasting-drink', 'fasting-teeth', 'fasting-gum', 'fasting-alcohol', 'fasting-smoking', 'water-free', 'unscented-soap'])
const FIELD_OF_RULE: Record<string, string> = {
  'collected-in-future': 'collectedAt', 'collected-at-invalid': 'collectedAt',
  'rolls-over-limit': 'rolls', 'rolls-below-one': 'rolls', 'rolls-not-whole': 'rolls',
  'target-needs-first-symptoms': 'firstSymptomsAt', 'first-symptoms-after-collection': 'firstSymptomsAt',
  'first-symptoms-invalid': 'firstSymptomsAt', 'control-has-first-symptoms': 'firstSymptomsAt',
}
function fieldErrorsOfProblems(problems: Problem[]) {
  const out: Record<string, string> = {}
  for (const p of problems) { const f = FIELD_OF_RULE[p.rule]; if (f) out[f] ??= p.message }
  return out
}

// ---------------------------------------------------------------------------------------------------------------
// Reading the bank

export type BankStatus = SampleState['status'] | 'awaiting-answers'

function describeSample(row: SampleRow, uses: readonly UseRow[], now: Date, policy: SamplePolicy, excludeFlagged: boolean) {
  const own = uses.filter(u => u.sampleId === row.id)
  const state = bagState(pureBag(row, policy, excludeFlagged), own.map(pureUse), now, policy)
  const awaiting = state.state === 'awaiting-answers'
  return {
    id: row.id, kind: row.kind, bagCode: row.bagCode, collectedAt: row.collectedAt, firstSymptomsAt: row.firstSymptomsAt,
    medicationBefore: row.medicationBefore, timing: timingOf(row, policy),
    rolls: row.rolls, answers: row.answers, answersComplete: row.answersCompletedAt !== null,
    compromised: row.compromised, compromisedReasons: row.compromisedReasons ?? [], overrideReason: row.overrideReason,
    outerBagId: row.outerBagId, discardedAt: row.discardedAt, discardReason: row.discardReason, notes: row.notes,
    collectorId: row.collectorId,
    status: (awaiting ? 'awaiting-answers' : state.status) as BankStatus,
    // The one decision every screen lists by (shared/utils/samples.ts bagState).
    state: state.state, list: state.list, inStock: state.inStock, useUntil: state.useUntil,
    usesLeft: state.usesLeft, usesRecorded: own.length,
    expiresAt: state.expiresAt, renewAt: state.renewAt, openUse: state.openUse, overdueUse: state.overdueUse, overridden: state.overridden,
    uses: own.map(u => ({ id: u.id, outAt: u.outAt, backAt: u.backAt, discarded: u.discarded, stage: u.stage, sessionRef: u.sessionRef, overLimit: u.overLimit })),
  }
}

async function loadBank(db: DbOrTx, clientId: string) {
  const [sampleRows, useRows, bagRows, containerRows, excludeFlagged] = await Promise.all([
    db.select().from(samples).where(eq(samples.clientId, clientId)).orderBy(asc(samples.collectedAt)),
    db.select().from(sampleUses).where(eq(sampleUses.clientId, clientId)).orderBy(asc(sampleUses.outAt)),
    db.select().from(sampleOuterBags).where(eq(sampleOuterBags.clientId, clientId)).orderBy(asc(sampleOuterBags.createdAt)),
    db.select().from(sampleContainers).where(eq(sampleContainers.clientId, clientId)).orderBy(asc(sampleContainers.createdAt)),
    excludesFlaggedTargets(db, clientId),
  ])
  return { sampleRows, useRows, bagRows, containerRows, excludeFlagged }
}

function forecastOf(sampleRows: SampleRow[], useRows: UseRow[], now: Date, policy: SamplePolicy, excludeFlagged: boolean) {
  const uses = useRows.map(pureUse)
  return { forecast: stockForecast(sampleRows.map(r => pureBag(r, policy, excludeFlagged)), uses, now, policy), summary: bankSummary(sampleRows.map(pureSample), uses, now, policy) }
}

/** The whole bank of one household: samples with their state, bags, containers, forecast and reminder status. */
export async function getSampleBank(user: AuthUser, client: ClientRow) {
  const db = useDb()
  const now = new Date()
  const [policy, bank, [status]] = await Promise.all([
    samplePolicy(db), loadBank(db, client.id),
    db.select().from(sampleBankStatus).where(eq(sampleBankStatus.clientId, client.id)).limit(1),
  ])
  const live = bank.sampleRows.filter(s => s.discardedAt === null)
  const { forecast, summary } = forecastOf(bank.sampleRows, bank.useRows, now, policy, bank.excludeFlagged)
  return {
    client: { id: client.id, householdName: client.householdName, personName: client.personName },
    policy,
    now: now.toISOString(),
    canOverride: user.role !== 'handler',
    samples: bank.sampleRows.map(r => describeSample(r, bank.useRows, now, policy, bank.excludeFlagged)),
    settings: { excludeFlaggedTargets: bank.excludeFlagged },
    outerBags: bank.bagRows.map(b => ({ ...b, bags: live.filter(s => s.outerBagId === b.id).length })),
    containers: bank.containerRows.map(c => ({ ...c, outerBags: bank.bagRows.filter(b => b.containerId === c.id).length })),
    forecast,
    summary,
    reminder: status ? { restockDue: status.restockDue, episode: status.restockEpisode, dueSince: status.restockDueSince, reminderQueuedAt: status.reminderQueuedAt } : null,
  }
}

export async function getSampleDetail(user: AuthUser, sample: SampleRow, client: ClientRow) {
  const bank = await getSampleBank(user, client)
  const one = bank.samples.find(s => s.id === sample.id)!
  return {
    sample: one, policy: bank.policy, client: bank.client, canOverride: bank.canOverride,
    outerBags: bank.outerBags.filter(b => b.kind === sample.kind),
    containers: bank.containers.filter(c => c.kind === sample.kind),
  }
}

// ---------------------------------------------------------------------------------------------------------------
// Changes

async function checkedCollection(input: { kind: SampleRow['kind'], collectedAt: Date, firstSymptomsAt?: Date | null, rolls: number, answers?: CollectionAnswersInput }, policy: SamplePolicy) {
  const check = checkCollection(collectionOf(input.kind, input.collectedAt, input.firstSymptomsAt, input.rolls, input.answers), policy, new Date())
  if (!check.valid) sampleRuleError(check.invalid, fieldErrorsOfProblems(check.invalid))
  return check
}

export async function createSample(user: AuthUser, client: ClientRow, input: SampleCreateInput) {
  const db = useDb()
  const policy = await samplePolicy(db)
  const check = await checkedCollection(input, policy)
  const quick = input.answers === undefined
  const compromising = quick ? [] : check.compromising.filter(p => EXPOSURE_RULES.has(p.rule))
  if (input.bagCode && !isPhoneBagCode(input.bagCode, input.kind)) {
    sampleRuleError([{ rule: 'bag-code-kind', message: `Bag code ${input.bagCode} is for a ${input.kind === 'target' ? 'control' : 'target'} sample; a ${input.kind} sample's code starts with ${input.kind === 'target' ? 'T' : 'C'}.` }], { bagCode: 'This code is for the other kind of sample.' })
  }
  return db.transaction(async (tx) => {
    const taken = new Set((await tx.select({ c: samples.bagCode }).from(samples).where(eq(samples.clientId, client.id))).map(r => r.c))
    // A code made on the phone is already on the bag: kept as it is, or refused if another bag of the household has it.
    if (input.bagCode && taken.has(input.bagCode)) bagCodeTaken(input.bagCode)
    const [row] = await tx.insert(samples).values({
      clientId: client.id, kind: input.kind, bagCode: input.bagCode ?? uniqueBagCode(input.kind, taken), collectedAt: input.collectedAt,
      firstSymptomsAt: input.kind === 'target' ? input.firstSymptomsAt ?? null : null, collectorId: user.id, rolls: input.rolls,
      medicationBefore: input.kind === 'target' ? input.medicationBefore ?? null : null,
      answers: input.answers ? answersToJson(input.answers) : null, answersCompletedAt: quick ? null : new Date(),
      compromised: compromising.length > 0, compromisedReasons: compromising.length ? compromising : null, notes: input.notes ?? null,
    }).returning()
    await logAudit(tx, { actorId: user.id, action: quick ? 'sample.quick-saved' : 'sample.collected', entityType: 'sample', entityId: row!.id, clientId: client.id, data: { kind: row!.kind, bagCode: row!.bagCode, compromised: row!.compromised, rules: compromising.map(p => p.rule) } })
    await refreshSampleBank(tx, client.id, policy)
    return row!
  }).catch((err: unknown) => {
    // Two sends racing past the check meet the unique index: a 409 then too, never a 500.
    const text = `${(err as Error)?.message ?? ''} ${String((err as { cause?: unknown })?.cause ?? '')}`
    if (input.bagCode && /UNIQUE constraint failed: samples\.client_id, samples\.bag_code/.test(text)) bagCodeTaken(input.bagCode)
    throw err
  })
}

/** A 409: the phone-made code is already on another bag of the household (data.rules names 'bag-code-taken'). */
function bagCodeTaken(code: string): never {
  const problems = [{ rule: 'bag-code-taken', message: `Another bag of this household already has the code ${code}. Give this bag a new code and write it on the bag instead.` }]
  throw createError({ statusCode: 409, statusMessage: 'Conflict', message: problems[0]!.message, data: { rules: ['bag-code-taken'], problems, fieldErrors: { bagCode: problems[0]!.message } } })
}

export async function completeSampleAnswers(user: AuthUser, sample: SampleRow, input: SampleAnswersInput) {
  const db = useDb()
  const policy = await samplePolicy(db)
  const merged = {
    kind: sample.kind, collectedAt: input.collectedAt ?? sample.collectedAt,
    firstSymptomsAt: input.firstSymptomsAt !== undefined ? input.firstSymptomsAt : sample.firstSymptomsAt,
    rolls: input.rolls ?? sample.rolls, answers: input.answers,
  }
  if (sample.discardedAt) sampleRuleError([{ rule: 'discarded', message: 'This sample has been thrown away; its answers can no longer change.' }])
  const [used] = await db.select({ n: sql<number>`count(*)` }).from(sampleUses).where(eq(sampleUses.sampleId, sample.id))
  if ((used?.n ?? 0) > 0) sampleRuleError([{ rule: 'already-used', message: 'This sample has already been used in training; its collection answers can no longer change.' }])
  const check = await checkedCollection(merged, policy)
  const compromising = check.compromising
  return db.transaction(async (tx) => {
    const [row] = await tx.update(samples).set({
      collectedAt: merged.collectedAt, firstSymptomsAt: merged.kind === 'target' ? merged.firstSymptomsAt ?? null : null, rolls: merged.rolls,
      medicationBefore: merged.kind === 'target' ? (input.medicationBefore !== undefined ? input.medicationBefore : sample.medicationBefore) : null,
      answers: answersToJson(input.answers), answersCompletedAt: new Date(), compromised: compromising.length > 0,
      compromisedReasons: compromising.length ? compromising : null, overrideReason: compromising.length ? sample.overrideReason : null,
    }).where(eq(samples.id, sample.id)).returning()
    await logAudit(tx, { actorId: user.id, action: 'sample.answers-recorded', entityType: 'sample', entityId: sample.id, clientId: sample.clientId, data: { compromised: row!.compromised, rules: compromising.map(p => p.rule) } })
    await refreshSampleBank(tx, sample.clientId, policy)
    return row!
  })
}

async function containerKindOf(tx: DbOrTx, clientId: string, containerId: string | null) {
  if (!containerId) return null
  const [c] = await tx.select().from(sampleContainers).where(and(eq(sampleContainers.id, containerId), eq(sampleContainers.clientId, clientId))).limit(1)
  if (!c) notFound('freezer container in this household')
  return c
}

export async function storeSample(user: AuthUser, sample: SampleRow, input: SampleStoreInput) {
  const db = useDb()
  const policy = await samplePolicy(db)
  if (sample.discardedAt) sampleRuleError([{ rule: 'discarded', message: 'This sample has been thrown away and cannot be stored.' }])
  return db.transaction(async (tx) => {
    let outerBagId: string
    if ('outerBagId' in input) {
      const [bag] = await tx.select().from(sampleOuterBags).where(and(eq(sampleOuterBags.id, input.outerBagId), eq(sampleOuterBags.clientId, sample.clientId))).limit(1)
      if (!bag) notFound('outer bag in this household')
      const [n] = await tx.select({ n: sql<number>`count(*)` }).from(samples)
        .where(and(eq(samples.outerBagId, bag.id), isNull(samples.discardedAt), sql`${samples.id} <> ${sample.id}`))
      const container = await containerKindOf(tx, sample.clientId, bag.containerId)
      const packing = checkPacking({ bagKind: sample.kind, outerBagKind: bag.kind, outerBagCount: (n?.n ?? 0) + 1, containerKind: container?.kind ?? null }, policy)
      if (!packing.ok) sampleRuleError(packing.problems)
      outerBagId = bag.id
    }
    else {
      let container = await containerKindOf(tx, sample.clientId, input.newOuterBag.containerId)
      if (input.newOuterBag.newContainerLabel) {
        const [created] = await tx.insert(sampleContainers).values({ clientId: sample.clientId, kind: sample.kind, label: input.newOuterBag.newContainerLabel, createdById: user.id }).returning()
        container = created ?? null
      }
      const packing = checkPacking({ bagKind: sample.kind, outerBagKind: sample.kind, outerBagCount: 1, containerKind: container?.kind ?? null }, policy)
      if (!packing.ok) sampleRuleError(packing.problems)
      const [count] = await tx.select({ n: sql<number>`count(*)` }).from(sampleOuterBags).where(and(eq(sampleOuterBags.clientId, sample.clientId), eq(sampleOuterBags.kind, sample.kind)))
      const label = input.newOuterBag.label ?? `${sample.kind === 'target' ? 'Target' : 'Control'} bag ${(count?.n ?? 0) + 1}`
      const [bag] = await tx.insert(sampleOuterBags).values({ clientId: sample.clientId, kind: sample.kind, label, containerId: container?.id ?? null }).returning()
      outerBagId = bag!.id
    }
    const [row] = await tx.update(samples).set({ outerBagId }).where(eq(samples.id, sample.id)).returning()
    await logAudit(tx, { actorId: user.id, action: 'sample.stored', entityType: 'sample', entityId: sample.id, clientId: sample.clientId, data: { outerBagId } })
    return row!
  })
}

export async function createSampleContainer(user: AuthUser, client: ClientRow, input: ContainerCreateInput) {
  return useDb().transaction(async (tx) => {
    const [row] = await tx.insert(sampleContainers).values({ clientId: client.id, kind: input.kind, label: input.label, createdById: user.id }).returning()
    await logAudit(tx, { actorId: user.id, action: 'sample-container.added', entityType: 'sample-container', entityId: row!.id, clientId: client.id, data: { kind: input.kind, label: input.label } })
    return row!
  })
}

export async function moveOuterBag(user: AuthUser, bag: typeof sampleOuterBags.$inferSelect, containerId: string | null) {
  const db = useDb()
  const policy = await samplePolicy(db)
  return db.transaction(async (tx) => {
    const container = await containerKindOf(tx, bag.clientId, containerId)
    const [n] = await tx.select({ n: sql<number>`count(*)` }).from(samples).where(and(eq(samples.outerBagId, bag.id), isNull(samples.discardedAt)))
    const packing = checkPacking({ bagKind: bag.kind, outerBagKind: bag.kind, outerBagCount: Math.max(1, n?.n ?? 0), containerKind: container?.kind ?? null }, policy)
    if (!packing.ok) sampleRuleError(packing.problems)
    const [row] = await tx.update(sampleOuterBags).set({ containerId: container?.id ?? null }).where(eq(sampleOuterBags.id, bag.id)).returning()
    await logAudit(tx, { actorId: user.id, action: 'sample-outer-bag.moved', entityType: 'sample-outer-bag', entityId: bag.id, clientId: bag.clientId, data: { containerId } })
    return row!
  })
}

export async function recordSampleUse(user: AuthUser, sample: SampleRow, input: UseCreateInput) {
  const db = useDb()
  const policy = await samplePolicy(db)
  return db.transaction(async (tx) => {
    const [fresh] = await tx.select().from(samples).where(eq(samples.id, sample.id)).limit(1)
    const own = await tx.select().from(sampleUses).where(eq(sampleUses.sampleId, sample.id))
    if (fresh!.answersCompletedAt === null) {
      sampleRuleError([{ rule: 'answers-missing', message: 'Complete the collection checklist for this sample before it is used in training.' }])
    }
    if (pureBag(fresh!, policy, await excludesFlaggedTargets(tx, sample.clientId)).keptOut) {
      sampleRuleError([{ rule: 'kept-out', message: 'Your trainer keeps targets collected late in an episode or after medication out of training. Use another target sample.' }])
    }
    const check = checkUse({
      sample: pureSample(fresh!), uses: own.map(pureUse), use: { outAt: input.outAt, backAt: input.backAt, stage: input.stage, discarded: input.discarded },
      maintenanceSession: input.maintenanceSession || input.stage === 'maintenance', now: new Date(), policy,
    })
    if (!check.ok) sampleRuleError([...check.invalid, ...check.refused])
    const [row] = await tx.insert(sampleUses).values({
      sampleId: sample.id, clientId: sample.clientId, outAt: input.outAt, backAt: input.backAt, stage: input.stage,
      sessionRef: input.sessionRef, discarded: check.discards, overLimit: check.overLimit, recordedById: user.id,
    }).returning()
    if (check.discards && input.backAt) {
      await tx.update(samples).set({ discardedAt: input.backAt, discardReason: discardReasonOf({ discarded: input.discarded ?? false, stage: input.stage, overLimit: check.overLimit }, policy) }).where(eq(samples.id, sample.id))
    }
    await logAudit(tx, { actorId: user.id, action: 'sample.used', entityType: 'sample', entityId: sample.id, clientId: sample.clientId, data: { useId: row!.id, stage: input.stage, discards: check.discards, overLimit: check.overLimit } })
    await refreshSampleBank(tx, sample.clientId, policy)
    return { use: row!, warnings: check.warnings, discards: check.discards }
  })
}

export async function closeSampleUse(user: AuthUser, use: UseRow, input: UseCloseInput) {
  // The same put-back sent again (its answer was lost on the way to a phone with a weak signal): already done.
  if (use.backAt && use.backAt.getTime() === input.backAt.getTime()) return { use, warnings: [], discards: use.discarded }
  const db = useDb()
  const policy = await samplePolicy(db)
  return db.transaction(async (tx) => {
    const check = checkUseReturn(use, input.backAt, new Date(), policy)
    if (!check.ok) sampleRuleError(check.invalid)
    const closed = { discarded: input.discarded || use.discarded, stage: use.stage, overLimit: check.overLimit }
    const discards = useDiscards(closed, policy)
    const [row] = await tx.update(sampleUses).set({ backAt: input.backAt, discarded: discards, overLimit: check.overLimit })
      .where(and(eq(sampleUses.id, use.id), isNull(sampleUses.backAt))).returning()
    if (!row) sampleRuleError([{ rule: 'use-already-closed', message: 'This use is already closed: the sample is back in the freezer.' }])
    if (discards) {
      await tx.update(samples).set({ discardedAt: input.backAt, discardReason: discardReasonOf(closed, policy) })
        .where(and(eq(samples.id, use.sampleId), isNull(samples.discardedAt)))
    }
    await logAudit(tx, { actorId: user.id, action: 'sample.returned', entityType: 'sample', entityId: use.sampleId, clientId: use.clientId, data: { useId: use.id, discards, overLimit: check.overLimit } })
    await refreshSampleBank(tx, use.clientId, policy)
    return { use: row, warnings: check.warnings, discards }
  })
}

export async function overrideSample(user: AuthUser, sample: SampleRow, reason: string) {
  refuseHandler(user, 'allow a compromised sample')
  if (!sample.compromised || sample.answersCompletedAt === null) {
    sampleRuleError([{ rule: 'not-compromised', message: sample.answersCompletedAt === null ? 'The checklist for this sample is not complete yet: complete it first.' : 'This sample is not compromised: there is nothing to override.' }])
  }
  const db = useDb()
  const policy = await samplePolicy(db)
  return db.transaction(async (tx) => {
    const [row] = await tx.update(samples).set({ overrideReason: reason, overrideById: user.id }).where(eq(samples.id, sample.id)).returning()
    await logAudit(tx, { actorId: user.id, action: 'sample.override', entityType: 'sample', entityId: sample.id, clientId: sample.clientId, data: { reason, rules: (sample.compromisedReasons ?? []).map(p => p.rule) } })
    await refreshSampleBank(tx, sample.clientId, policy)
    return row!
  })
}

/** The trainer keeps flagged targets (late, or after medication) of one household out of training, or lets them in. */
export async function setSampleSettings(user: AuthUser, client: ClientRow, input: SampleSettingsInput) {
  const db = useDb()
  const policy = await samplePolicy(db)
  return db.transaction(async (tx) => {
    const before = await excludesFlaggedTargets(tx, client.id)
    const [row] = await tx.insert(sampleBankSettings).values({ clientId: client.id, excludeFlaggedTargets: input.excludeFlaggedTargets, updatedById: user.id })
      .onConflictDoUpdate({ target: sampleBankSettings.clientId, set: { excludeFlaggedTargets: input.excludeFlaggedTargets, updatedById: user.id, updatedAt: new Date() } }).returning()
    await logAudit(tx, {
      actorId: user.id, action: 'sample-settings.set', entityType: 'client', entityId: client.id, clientId: client.id,
      data: { name: input.excludeFlaggedTargets ? 'Flagged targets kept out of training' : 'Flagged targets allowed in training', before: { excludeFlaggedTargets: before }, after: input },
    })
    await refreshSampleBank(tx, client.id, policy)
    return { clientId: row!.clientId, excludeFlaggedTargets: row!.excludeFlaggedTargets }
  })
}

export async function discardSample(user: AuthUser, sample: SampleRow, reason: string) {
  if (sample.discardedAt) sampleRuleError([{ rule: 'discarded', message: 'This sample has already been thrown away.' }])
  const db = useDb()
  const policy = await samplePolicy(db)
  return db.transaction(async (tx) => {
    const [open] = await tx.select({ id: sampleUses.id }).from(sampleUses).where(and(eq(sampleUses.sampleId, sample.id), isNull(sampleUses.backAt))).limit(1)
    const at = new Date()
    if (open) await tx.update(sampleUses).set({ backAt: at, discarded: true }).where(eq(sampleUses.id, open.id))
    const [row] = await tx.update(samples).set({ discardedAt: at, discardReason: reason }).where(eq(samples.id, sample.id)).returning()
    await logAudit(tx, { actorId: user.id, action: 'sample.discarded', entityType: 'sample', entityId: sample.id, clientId: sample.clientId, data: { reason } })
    await refreshSampleBank(tx, sample.clientId, policy)
    return row!
  })
}

// ---------------------------------------------------------------------------------------------------------------
// Stock status and the restocking reminder

const KIND_WORDS = { target: 'target (episode)', control: 'control (well)' } as const

async function queueRestockReminder(tx: Tx, clientId: string, episode: number, forecast: StockForecast, lowKinds: ('target' | 'control')[]) {
  const [client] = await tx.select().from(clients).where(eq(clients.id, clientId)).limit(1)
  if (!client || client.status === 'closed') return false
  const handlers = await tx.select({ id: users.id, name: users.name, email: users.email }).from(clientHandlers)
    .innerJoin(users, eq(users.id, clientHandlers.userId)).where(and(eq(clientHandlers.clientId, clientId), isNull(users.disabledAt)))
  if (!handlers.length) return false
  const business = await readSetting('business', businessProfileSchema, businessProfile.defaults, tx)
  const when = (k: 'target' | 'control') => {
    const f = forecast[k]
    if (f.usesLeft === 0) return `There are no usable ${KIND_WORDS[k]} samples left.`
    const date = f.runsOutAt ? new Date(f.runsOutAt).toLocaleDateString('en-GB', { dateStyle: 'long', timeZone: business.timeZone }) : null
    if (f.daysLeft !== null && date) return `At the rate they are being used, the ${KIND_WORDS[k]} samples will run out in about ${f.daysLeft} days (around ${date}).`
    return `The usable ${KIND_WORDS[k]} samples are getting old and will soon be for maintenance work only.`
  }
  for (const h of handlers) {
    await queueEmail(tx, {
      to: h.email,
      dedupeKey: `sample-restock:${clientId}:${episode}:${h.id}`,
      ...composeEmail({
        subject: `Time to collect more ${lowKinds.join(' and ')} samples`,
        greeting: `Hello ${h.name},`,
        paragraphs: [
          `${client.householdName}'s sample bank is running low.`,
          ...lowKinds.map(when),
          'When you collect: nothing to eat or drink but water, no tooth brushing, gum, alcohol or smoking for the time on your checklist, no water shortly before, and hands washed with unscented soap. Forescent walks you through it and gives you the code to write on the bag in pencil.',
          'Saliva samples are biological material: wash your hands, keep them in a food-free freezer compartment, and throw used rolls away hygienically. Your dog supplements your treatment plan and never replaces it.',
        ],
        action: { label: 'Collect a sample', url: appUrl(`/handler/samples/${clientId}/collect`) },
      }),
    })
  }
  return true
}

/**
 * Recomputes a household's stock status inside the caller's transaction and, when a low-stock episode starts,
 * queues the collection reminder (once per episode: the outbox's dedupe key names the episode and handler).
 */
export async function refreshSampleBank(tx: Tx, clientId: string, policy?: SamplePolicy, now = new Date()) {
  const pol = policy ?? await samplePolicy(tx)
  const [sampleRows, useRows, [prev], excludeFlagged] = await Promise.all([
    tx.select().from(samples).where(eq(samples.clientId, clientId)),
    tx.select().from(sampleUses).where(eq(sampleUses.clientId, clientId)),
    tx.select().from(sampleBankStatus).where(eq(sampleBankStatus.clientId, clientId)).limit(1),
    excludesFlaggedTargets(tx, clientId),
  ])
  if (!sampleRows.length && !prev) return null
  const { forecast, summary } = forecastOf(sampleRows, useRows, now, pol, excludeFlagged)
  const next = restockTransition(prev ? { restockDue: prev.restockDue, episode: prev.restockEpisode } : null, forecast)
  let reminderQueuedAt = prev?.reminderQueuedAt ?? null
  if (next.remind && await queueRestockReminder(tx, clientId, next.episode, forecast, next.lowKinds)) reminderQueuedAt = now
  if (!next.restockDue) reminderQueuedAt = null
  const values = {
    summary: stockRosterValue(forecast, summary, next.restockDue ? reminderQueuedAt : null, awaitingCount(sampleRows, now, pol)) as unknown as Record<string, unknown>,
    restockDue: next.restockDue, restockEpisode: next.episode,
    restockDueSince: next.restockDue ? (prev?.restockDue ? prev.restockDueSince : now) : null,
    reminderQueuedAt, checkedAt: now,
  }
  await tx.insert(sampleBankStatus).values({ clientId, ...values }).onConflictDoUpdate({ target: sampleBankStatus.clientId, set: values })
  return values
}

/** Quick saves still waiting for answers that would otherwise count as compromised (not discarded, not too old). */
function awaitingCount(rows: SampleRow[], now: Date, policy: SamplePolicy) {
  return rows.filter(r => r.answersCompletedAt === null && r.discardedAt === null && now.getTime() - r.collectedAt.getTime() <= policy.expireAfterDays * 86_400_000).length
}

/** The stock status is rechecked at least this often, because samples age and the rate window slides. */
export const SAMPLE_STATUS_MAX_AGE_MS = 60 * 60 * 1000 // our own choice: hourly is plenty for a 21-day warning

/**
 * The periodic check: households with samples whose status is missing or older than SAMPLE_STATUS_MAX_AGE_MS, a
 * batch at a time (one indexed query to find them). Returns how many were refreshed.
 */
export async function checkStaleSampleBanks(limit = 50, now = new Date()): Promise<number> {
  const db = useDb()
  const stale = await db.selectDistinct({ clientId: samples.clientId }).from(samples)
    .leftJoin(sampleBankStatus, eq(sampleBankStatus.clientId, samples.clientId))
    .where(or(isNull(sampleBankStatus.clientId), lt(sampleBankStatus.checkedAt, new Date(now.getTime() - SAMPLE_STATUS_MAX_AGE_MS))))
    .limit(limit)
  if (!stale.length) return 0
  const policy = await samplePolicy(db)
  for (const { clientId } of stale) await db.transaction(tx => refreshSampleBank(tx, clientId, policy, now))
  return stale.length
}

/** Roster column: each household's stored stock status (one query for the page). */
export async function sampleRosterStatus(clientIds: string[]): Promise<Map<string, SampleRosterValue>> {
  const rows = await useDb().select({ clientId: sampleBankStatus.clientId, summary: sampleBankStatus.summary })
    .from(sampleBankStatus).where(inArray(sampleBankStatus.clientId, clientIds))
  return new Map(rows.map(r => [r.clientId, r.summary as unknown as SampleRosterValue]))
}
