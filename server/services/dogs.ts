// Dog profiles: loading a dog the user may see, and every change to it, each in one transaction with its audit entry.
import type { H3Event } from 'h3'
import { and, asc, desc, eq, inArray, ne } from 'drizzle-orm'
import { alias } from 'drizzle-orm/sqlite-core'
import { clients, dogAssessments, dogHealthRecords, dogPhotos, dogStatusChanges, dogs, users } from '../database/schema'
import type { AssessmentInput, DogCreateInput, DogStatusChangeInput, DogUpdateInput, HealthRecordInput, HealthRecordUpdateInput } from '../../shared/schemas/dogs'
import {
  assessmentSummary, dogAge, healthRecordStates, healthSummary, pastDayProblem, statusChangeProblems, todayInTimeZone,
  ASSESSMENT_OUTCOME_SHORT, DOG_STATUS_LABELS, EMPTY_HEALTH_SUMMARY,
} from '../../shared/utils/dogs'
import type { AuthUser } from '../utils/authz'
import type { DbOrTx, Tx } from '../utils/db'

type DogRow = typeof dogs.$inferSelect
type ClientRow = typeof clients.$inferSelect
type HealthRow = typeof dogHealthRecords.$inferSelect

/** Today's calendar day for this user (their time zone): the limit for dates that must not be in the future. */
export function dogToday(user: AuthUser): string {
  return todayInTimeZone(user.timeZone)
}

/** A 422 naming the fields to correct, like readValidatedJson's, for rules that need the database or today's date. */
export function dogRuleError(fieldErrors: Record<string, string>): never {
  throw createError({
    statusCode: 422,
    statusMessage: 'Unprocessable Content',
    message: Object.values(fieldErrors).join(' '),
    data: { fieldErrors },
  })
}

function refuseWriteForHandler(user: AuthUser) {
  if (user.role === 'handler') {
    throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: "Only the trainer can change the dog's profile." })
  }
}

/** Loads a dog whose client the user may see, or answers 404 (the same for "does not exist" and "not yours"). */
export async function requireDogAccess(event: H3Event, dogId: string, opts: { write?: boolean } = {}) {
  const user = requireUser(event)
  const [row] = await useDb().select({ dog: dogs, client: clients }).from(dogs)
    .innerJoin(clients, eq(clients.id, dogs.clientId))
    .where(and(eq(dogs.id, dogId), clientScope(user))).limit(1)
  if (!row) notFound('dog')
  if (opts.write) refuseWriteForHandler(user)
  return { user, dog: row.dog, client: row.client }
}

/** Loads a health record through its dog and client, with the same scoping. */
export async function requireHealthRecordAccess(event: H3Event, recordId: string, opts: { write?: boolean } = {}) {
  const user = requireUser(event)
  const [row] = await useDb().select({ record: dogHealthRecords, dog: dogs, client: clients }).from(dogHealthRecords)
    .innerJoin(dogs, eq(dogs.id, dogHealthRecords.dogId))
    .innerJoin(clients, eq(clients.id, dogs.clientId))
    .where(and(eq(dogHealthRecords.id, recordId), clientScope(user))).limit(1)
  if (!row) notFound('health record')
  if (opts.write) refuseWriteForHandler(user)
  return { user, record: row.record, dog: row.dog, client: row.client }
}

// ---------------------------------------------------------------------------------------------------------------
// Reading

const changedBy = alias(users, 'changed_by')
const assessor = alias(users, 'assessor')

function sortHealth<T extends HealthRow & { superseded: boolean }>(rows: T[]): T[] {
  return rows.sort((a, b) => Number(a.superseded) - Number(b.superseded)
    || (a.dueOn ?? '9999-99-99').localeCompare(b.dueOn ?? '9999-99-99')
    || b.doneOn.localeCompare(a.doneOn))
}

export async function getDogProfile(user: AuthUser, dog: DogRow, client: ClientRow) {
  const db = useDb()
  const today = dogToday(user)
  const [history, health, assessments, photoVersions] = await Promise.all([
    db.select({
      id: dogStatusChanges.id, status: dogStatusChanges.status, effectiveOn: dogStatusChanges.effectiveOn,
      note: dogStatusChanges.note, createdAt: dogStatusChanges.createdAt, changedByName: changedBy.name,
    }).from(dogStatusChanges).leftJoin(changedBy, eq(changedBy.id, dogStatusChanges.changedById))
      .where(eq(dogStatusChanges.dogId, dog.id)).orderBy(asc(dogStatusChanges.effectiveOn), asc(dogStatusChanges.createdAt)),
    db.select().from(dogHealthRecords).where(eq(dogHealthRecords.dogId, dog.id)).orderBy(asc(dogHealthRecords.createdAt)),
    db.select({ assessment: dogAssessments, assessorName: assessor.name }).from(dogAssessments)
      .leftJoin(assessor, eq(assessor.id, dogAssessments.assessorId))
      .where(eq(dogAssessments.dogId, dog.id)).orderBy(desc(dogAssessments.assessedOn), desc(dogAssessments.createdAt)),
    dogPhotoVersions([dog.id]),
  ])
  const states = healthRecordStates(health, today)
  return {
    today,
    dog,
    client: { id: client.id, householdName: client.householdName, personName: client.personName },
    age: dogAge(dog.dateOfBirth, today),
    photoVersion: photoVersions.get(dog.id) ?? null,
    statusSince: history.at(-1)?.effectiveOn ?? null,
    statusHistory: history,
    healthRecords: sortHealth(health.map(r => ({ ...r, ...states.get(r.id)! }))),
    health: healthSummary(health, today)[dog.id] ?? EMPTY_HEALTH_SUMMARY,
    assessments: assessments.map(a => ({ ...a.assessment, assessorName: a.assessorName, summary: assessmentSummary(a.assessment.scores) })),
    canEdit: user.role !== 'handler',
  }
}

/** A client's dogs with their age and health flag (for the client file). */
export async function listClientDogs(user: AuthUser, clientId: string) {
  const db = useDb()
  const today = dogToday(user)
  const rows = await db.select().from(dogs).where(eq(dogs.clientId, clientId)).orderBy(asc(dogs.createdAt), asc(dogs.id))
  const ids = rows.map(d => d.id)
  const [health, photoVersions] = rows.length
    ? await Promise.all([db.select().from(dogHealthRecords).where(inArray(dogHealthRecords.dogId, ids)), dogPhotoVersions(ids)])
    : [[], new Map<string, number>()]
  const summary = healthSummary(health, today)
  return rows.map(d => ({
    ...d,
    age: dogAge(d.dateOfBirth, today),
    health: summary[d.id] ?? EMPTY_HEALTH_SUMMARY,
    photoVersion: photoVersions.get(d.id) ?? null,
  }))
}

/**
 * Which of these dogs have a photo, as the time it was last replaced (milliseconds): the page asks for a photo only
 * when there is one, and the version in its address lets the browser keep it until it changes.
 */
async function dogPhotoVersions(dogIds: string[]): Promise<Map<string, number>> {
  const rows = await useDb().select({ dogId: dogPhotos.dogId, updatedAt: dogPhotos.updatedAt }).from(dogPhotos)
    .where(inArray(dogPhotos.dogId, dogIds))
  return new Map(rows.map(r => [r.dogId, r.updatedAt.getTime()]))
}

// ---------------------------------------------------------------------------------------------------------------
// Changing

async function assertMicrochipFree(tx: Tx, microchip: string | null | undefined, exceptDogId?: string) {
  if (!microchip) return
  const [other] = await tx.select({ id: dogs.id }).from(dogs)
    .where(and(eq(dogs.microchip, microchip), exceptDogId ? ne(dogs.id, exceptDogId) : undefined)).limit(1)
  if (other) microchipTaken()
}

function microchipTaken(): never {
  const fieldErrors = { microchip: 'Another dog already has this microchip number. Check the digits against the chip record.' }
  throw createError({ statusCode: 409, statusMessage: 'Conflict', message: fieldErrors.microchip, data: { fieldErrors } })
}

/** Two requests racing past the check meet the unique index: answer 409 then too, never a 500. */
async function withMicrochipGuard<T>(work: () => Promise<T>): Promise<T> {
  try {
    return await work()
  }
  catch (err) {
    const text = `${(err as Error)?.message ?? ''} ${String((err as { cause?: unknown })?.cause ?? '')}`
    if (/UNIQUE constraint failed: dogs\.microchip/.test(text)) microchipTaken()
    throw err
  }
}

export async function createDog(user: AuthUser, client: ClientRow, input: DogCreateInput) {
  const today = dogToday(user)
  const startedOn = input.startedOn ?? today
  const problems: Record<string, string> = {}
  if (input.dateOfBirth && input.dateOfBirth > today) problems.dateOfBirth = `The date of birth cannot be in the future (today is ${today}).`
  const startProblem = pastDayProblem(startedOn, today, input.dateOfBirth ?? null, 'The assessment start')
  if (startProblem) problems.startedOn = startProblem
  if (Object.keys(problems).length) dogRuleError(problems)
  const { startedOn: _s, ...fields } = input
  return withMicrochipGuard(() => useDb().transaction(async (tx) => {
    await assertMicrochipFree(tx, fields.microchip)
    const [dog] = await tx.insert(dogs).values({ ...fields, clientId: client.id, status: 'assessment' }).returning()
    await tx.insert(dogStatusChanges).values({ dogId: dog!.id, status: 'assessment', effectiveOn: startedOn, note: 'Added to the client file.', changedById: user.id })
    await logAudit(tx, { actorId: user.id, action: 'dog.added', entityType: 'dog', entityId: dog!.id, clientId: client.id, data: { name: dog!.name, startedOn } })
    return dog!
  }))
}

export async function updateDog(user: AuthUser, dog: DogRow, input: DogUpdateInput) {
  const today = dogToday(user)
  if (input.dateOfBirth && input.dateOfBirth > today) dogRuleError({ dateOfBirth: `The date of birth cannot be in the future (today is ${today}).` })
  const fields = (Object.keys(input) as (keyof DogUpdateInput)[]).filter(k => input[k] !== dog[k])
  return withMicrochipGuard(() => useDb().transaction(async (tx) => {
    if (input.microchip !== undefined) await assertMicrochipFree(tx, input.microchip, dog.id)
    const [row] = await tx.update(dogs).set(input).where(eq(dogs.id, dog.id)).returning()
    await logAudit(tx, { actorId: user.id, action: 'dog.updated', entityType: 'dog', entityId: dog.id, clientId: dog.clientId, data: { name: row!.name, fields } })
    return row!
  }))
}

async function latestStatusChange(db: DbOrTx, dogId: string) {
  const [row] = await db.select().from(dogStatusChanges).where(eq(dogStatusChanges.dogId, dogId))
    .orderBy(desc(dogStatusChanges.effectiveOn), desc(dogStatusChanges.createdAt)).limit(1)
  return row ?? null
}

async function latestAssessment(db: DbOrTx, dogId: string) {
  const [row] = await db.select().from(dogAssessments).where(eq(dogAssessments.dogId, dogId))
    .orderBy(desc(dogAssessments.assessedOn), desc(dogAssessments.createdAt)).limit(1)
  return row ?? null
}

export async function recordDogStatus(user: AuthUser, dog: DogRow, input: DogStatusChangeInput) {
  const today = dogToday(user)
  return useDb().transaction(async (tx) => {
    // Read inside the transaction, so the rules see the history the change is added to.
    const [current] = await tx.select().from(dogs).where(eq(dogs.id, dog.id))
    const [last, assessment] = await Promise.all([latestStatusChange(tx, dog.id), latestAssessment(tx, dog.id)])
    const problems = statusChangeProblems({
      name: current!.name, current: current!.status, latestChangeOn: last?.effectiveOn ?? null,
      latestAssessmentOutcome: assessment?.outcome ?? null, dateOfBirth: current!.dateOfBirth,
    }, input, today)
    if (Object.keys(problems).length) dogRuleError(problems)
    const [change] = await tx.insert(dogStatusChanges).values({ dogId: dog.id, ...input, changedById: user.id }).returning()
    const [row] = await tx.update(dogs).set({ status: input.status }).where(eq(dogs.id, dog.id)).returning()
    await logAudit(tx, {
      actorId: user.id, action: 'dog-status.recorded', entityType: 'dog', entityId: dog.id, clientId: dog.clientId,
      data: { name: `${row!.name} → ${DOG_STATUS_LABELS[input.status]} from ${input.effectiveOn}`, dog: row!.name, from: current!.status, to: input.status, effectiveOn: input.effectiveOn, note: input.note },
    })
    return { dog: row!, change: change! }
  })
}

function withState(record: HealthRow, today: string) {
  return { ...record, ...healthRecordStates([record], today).get(record.id)! }
}

export async function addDogHealthRecord(user: AuthUser, dog: DogRow, input: HealthRecordInput) {
  const today = dogToday(user)
  const problem = pastDayProblem(input.doneOn, today, dog.dateOfBirth, 'The date it was done')
  if (problem) dogRuleError({ doneOn: problem })
  return useDb().transaction(async (tx) => {
    const [record] = await tx.insert(dogHealthRecords).values({ dogId: dog.id, ...input, createdById: user.id }).returning()
    await logAudit(tx, {
      actorId: user.id, action: 'health-record.added', entityType: 'dog_health_record', entityId: record!.id, clientId: dog.clientId,
      data: { name: `${dog.name} · ${record!.name}`, dog: dog.name, kind: record!.kind, record: record!.name, doneOn: record!.doneOn, dueOn: record!.dueOn },
    })
    return withState(record!, today)
  })
}

export async function updateDogHealthRecord(user: AuthUser, dog: DogRow, record: HealthRow, input: HealthRecordUpdateInput) {
  const today = dogToday(user)
  const merged = { ...record, ...input }
  if (input.doneOn) {
    const problem = pastDayProblem(input.doneOn, today, dog.dateOfBirth, 'The date it was done')
    if (problem) dogRuleError({ doneOn: problem })
  }
  if (merged.dueOn && merged.dueOn < merged.doneOn) dogRuleError({ dueOn: `The renewal date must be on or after the date it was done (${merged.doneOn}).` })
  return useDb().transaction(async (tx) => {
    const [row] = await tx.update(dogHealthRecords).set(input).where(eq(dogHealthRecords.id, record.id)).returning()
    await logAudit(tx, {
      actorId: user.id, action: 'health-record.updated', entityType: 'dog_health_record', entityId: record.id, clientId: dog.clientId,
      data: { name: `${dog.name} · ${row!.name}`, dog: dog.name, record: row!.name, fields: Object.keys(input) },
    })
    return withState(row!, today)
  })
}

export async function deleteDogHealthRecord(user: AuthUser, dog: DogRow, record: HealthRow) {
  return useDb().transaction(async (tx) => {
    await tx.delete(dogHealthRecords).where(eq(dogHealthRecords.id, record.id))
    await logAudit(tx, {
      actorId: user.id, action: 'health-record.deleted', entityType: 'dog_health_record', entityId: record.id, clientId: dog.clientId,
      data: { name: `${dog.name} · ${record.name}`, dog: dog.name, kind: record.kind, record: record.name, doneOn: record.doneOn },
    })
    return record
  })
}

export async function addDogAssessment(user: AuthUser, dog: DogRow, input: AssessmentInput) {
  const today = dogToday(user)
  const problem = pastDayProblem(input.assessedOn, today, dog.dateOfBirth, 'The assessment date')
  if (problem) dogRuleError({ assessedOn: problem })
  const summary = assessmentSummary(input.scores)
  return useDb().transaction(async (tx) => {
    const [row] = await tx.insert(dogAssessments).values({ dogId: dog.id, ...input, assessorId: user.id }).returning()
    const [current] = await tx.select({ acceptedOn: dogs.acceptedOn }).from(dogs).where(eq(dogs.id, dog.id))
    if (input.outcome === 'accept' && (!current?.acceptedOn || input.assessedOn < current.acceptedOn)) {
      await tx.update(dogs).set({ acceptedOn: input.assessedOn }).where(eq(dogs.id, dog.id))
    }
    await logAudit(tx, {
      actorId: user.id, action: 'suitability-assessment.recorded', entityType: 'dog_assessment', entityId: row!.id, clientId: dog.clientId,
      data: { name: `${dog.name} · ${ASSESSMENT_OUTCOME_SHORT[input.outcome]}`, dog: dog.name, assessedOn: input.assessedOn, outcome: input.outcome, average: summary.average },
    })
    return { ...row!, assessorName: user.name, summary }
  })
}
