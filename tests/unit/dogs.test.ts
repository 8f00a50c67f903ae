import { describe, expect, it } from 'vitest'
import {
  ACCEPT_BEFORE_PLACING, ACCEPT_BEFORE_TRAINING, DUE_SOON_DAYS, MIN_TRAIT_SCORE, SUITABILITY_TRAITS, TRAIT_KEYS,
  assessmentSummary, calendarDaysBetween, dogAge, dueState, healthFlagText, healthRecordStates, healthSummary,
  isCalendarDay, pastDayProblem, statusChangeProblems, todayInTimeZone, worstDueState,
  type HealthRecordLike, type StatusContext,
} from '../../shared/utils/dogs'
import {
  assessmentSchema, dogCreateSchema, dogUpdateSchema, dogStatusChangeSchema, healthRecordSchema, healthRecordUpdateSchema,
  isValidMicrochip, normalizeMicrochip,
} from '../../shared/schemas/dogs'

describe('calendar days', () => {
  it('knows real days from impossible ones', () => {
    expect(isCalendarDay('2024-02-29')).toBe(true) // 2024 is a leap year
    expect(isCalendarDay('2025-02-29')).toBe(false)
    expect(isCalendarDay('2025-04-31')).toBe(false)
    expect(isCalendarDay('2025-13-01')).toBe(false)
    expect(isCalendarDay('25-01-01')).toBe(false)
  })
  it('counts whole days across month and year ends', () => {
    expect(calendarDaysBetween('2025-12-31', '2026-01-01')).toBe(1)
    expect(calendarDaysBetween('2024-02-01', '2024-03-01')).toBe(29)
    expect(calendarDaysBetween('2026-03-10', '2026-03-01')).toBe(-9)
    // Across the UK clock change (29 March 2026) a calendar day is still one day.
    expect(calendarDaysBetween('2026-03-28', '2026-03-30')).toBe(2)
  })
  it("finds today's day in the viewer's time zone", () => {
    const instant = new Date('2026-01-01T03:30:00Z')
    expect(todayInTimeZone('Europe/London', instant)).toBe('2026-01-01')
    expect(todayInTimeZone('America/New_York', instant)).toBe('2025-12-31') // UTC-5 in winter
    expect(todayInTimeZone('Not/AZone', instant)).toBe('2026-01-01') // falls back to UTC
  })
})

describe('dogAge', () => {
  const today = '2026-05-15'
  it.each([
    ['2026-05-15', '0 days'],
    ['2026-05-14', '1 day'],
    ['2026-05-05', '10 days'],
    ['2026-04-24', '3 weeks'],
    ['2026-04-15', '1 month'],
    ['2025-09-15', '8 months'],
    ['2025-09-16', '7 months'], // one day short of 8 whole months
    ['2025-05-15', '1 year'],
    ['2024-02-15', '2 years 3 months'],
    ['2024-04-15', '2 years 1 month'],
  ])('born %s → %s', (dob, want) => {
    expect(dogAge(dob, today)).toBe(want)
  })
  it('counts a month as complete on the last day of a shorter month', () => {
    expect(dogAge('2026-01-31', '2026-02-28')).toBe('1 month')
    expect(dogAge('2026-01-31', '2026-02-27')).toBe('3 weeks')
    expect(dogAge('2024-02-29', '2025-02-28')).toBe('1 year')
  })
  it('gives no age without a usable date of birth', () => {
    expect(dogAge(null, today)).toBeNull()
    expect(dogAge('', today)).toBeNull()
    expect(dogAge('2026-05-16', today)).toBeNull() // not born yet
    expect(dogAge('2026-02-30', today)).toBeNull()
  })
})

describe('dueState (warning window of 30 days: our own choice)', () => {
  const today = '2026-05-15'
  it('uses a 30-day window by default', () => expect(DUE_SOON_DAYS).toBe(30))
  it.each([
    [null, 'none'],
    ['2026-05-14', 'overdue'],
    ['2026-05-15', 'due-soon'], // due today is not yet overdue
    ['2026-06-14', 'due-soon'], // exactly 30 days ahead
    ['2026-06-15', 'ok'], // 31 days ahead
    ['2027-05-15', 'ok'],
  ] as const)('due %s → %s', (due, want) => {
    expect(dueState(due, today)).toBe(want)
  })
  it('honours another window', () => {
    expect(dueState('2026-06-15', today, 60)).toBe('due-soon')
    expect(dueState('2026-05-20', today, 3)).toBe('ok')
  })
  it('orders states by how urgent they are', () => {
    expect(worstDueState(['ok', 'none', 'due-soon'])).toBe('due-soon')
    expect(worstDueState(['due-soon', 'overdue', 'ok'])).toBe('overdue')
    expect(worstDueState([])).toBe('none')
  })
})

describe('health records', () => {
  const today = '2026-05-15'
  const rec = (id: string, dogId: string, name: string, doneOn: string, dueOn: string | null, kind: HealthRecordLike['kind'] = 'vaccination'): HealthRecordLike => ({ id, dogId, kind, name, doneOn, dueOn })
  const records = [
    rec('r1', 'juniper', 'Rabies', '2023-04-01', '2026-04-01'), // overdue, but renewed by r2
    rec('r2', 'juniper', 'rabies ', '2026-04-20', '2029-04-20'),
    rec('r3', 'juniper', 'Leptospirosis', '2025-06-01', '2026-06-01'), // due in 17 days
    rec('r4', 'juniper', 'Hip score', '2025-01-10', null, 'health-clearance'),
    rec('r5', 'basil', 'Worming', '2026-01-01', '2026-04-01', 'parasite-treatment'), // overdue
    rec('r6', 'basil', 'Distemper', '2025-05-01', '2026-06-10'), // due soon
    rec('r7', 'basil', 'Kennel cough', '2025-10-01', '2026-10-01'),
  ]
  it('lets a repeated record renew the earlier one (same kind and name, any case)', () => {
    const states = healthRecordStates(records, today)
    expect(states.get('r1')).toEqual({ id: 'r1', state: 'none', superseded: true, daysLeft: -44 })
    expect(states.get('r2')).toMatchObject({ state: 'ok', superseded: false })
    expect(states.get('r3')).toMatchObject({ state: 'due-soon', daysLeft: 17 })
    expect(states.get('r4')).toMatchObject({ state: 'none', daysLeft: null })
  })
  it('does not let a record of another kind with the same name renew it', () => {
    const states = healthRecordStates([rec('a', 'd', 'Check', '2025-01-01', '2026-01-01', 'other'), rec('b', 'd', 'Check', '2026-01-01', null, 'health-clearance')], today)
    expect(states.get('a')!.state).toBe('overdue')
  })
  it('summarises the worst state per dog with counts and the earliest date needing attention', () => {
    const sum = healthSummary(records, today)
    expect(sum.juniper).toEqual({ state: 'due-soon', overdue: 0, dueSoon: 1, next: { name: 'Leptospirosis', dueOn: '2026-06-01' } })
    expect(sum.basil).toEqual({ state: 'overdue', overdue: 1, dueSoon: 1, next: { name: 'Worming', dueOn: '2026-04-01' } })
    expect(sum.nobody).toBeUndefined()
    expect(healthFlagText(sum.basil!)).toBe('1 overdue, 1 due soon')
    expect(healthFlagText({ state: 'ok', overdue: 0, dueSoon: 0, next: null })).toBeNull()
  })
})

describe('suitability assessment (trait list: common practice)', () => {
  it('has six traits, each with a label and a one-line description', () => {
    expect(TRAIT_KEYS).toEqual(['scentDrive', 'focus', 'environmentalConfidence', 'sociability', 'startleRecovery', 'handlerEngagement'])
    for (const t of SUITABILITY_TRAITS) {
      expect(t.label.length).toBeGreaterThan(3)
      expect(t.description).toMatch(/\.$/)
      expect(t.description).not.toContain('\n')
    }
  })
  it('averages, finds the lowest trait and flags scores below the minimum of 3', () => {
    expect(MIN_TRAIT_SCORE).toBe(3)
    const s = assessmentSummary({ scentDrive: 5, focus: 4, environmentalConfidence: 2, sociability: 4, startleRecovery: 2, handlerEngagement: 4 })
    expect(s.average).toBe(3.5) // 21 / 6
    expect(s.lowest).toEqual({ key: 'environmentalConfidence', label: 'Environmental confidence', score: 2 }) // first of the tie
    expect(s.belowMinimum).toEqual(['environmentalConfidence', 'startleRecovery'])
    expect(s.anyBelowMinimum).toBe(true)
    expect(s.complete).toBe(true)
  })
  it('rounds the average to one decimal and copes with partial or empty scores', () => {
    expect(assessmentSummary({ scentDrive: 4, focus: 4, sociability: 5 }).average).toBe(4.3) // 13 / 3 = 4.33
    const partial = assessmentSummary({ scentDrive: 3 })
    expect(partial).toMatchObject({ scored: 1, complete: false, anyBelowMinimum: false })
    expect(assessmentSummary({})).toEqual({ average: null, scored: 0, complete: false, lowest: null, belowMinimum: [], anyBelowMinimum: false })
  })
})

describe('status changes', () => {
  const today = '2026-05-15'
  const ctx: StatusContext = { name: 'Juniper', current: 'assessment', latestChangeOn: '2026-03-01', latestAssessmentOutcome: 'accept', dateOfBirth: '2024-02-01' }
  it('allows a dated change after the latest one, the same day included', () => {
    expect(statusChangeProblems(ctx, { status: 'in-training', effectiveOn: '2026-05-15' }, today)).toEqual({})
    expect(statusChangeProblems(ctx, { status: 'in-training', effectiveOn: '2026-03-01' }, today)).toEqual({})
  })
  it('refuses a date after today', () => {
    expect(statusChangeProblems(ctx, { status: 'in-training', effectiveOn: '2026-05-16' }, today).effectiveOn).toMatch(/future/)
  })
  it('refuses a date before the latest change, naming it', () => {
    expect(statusChangeProblems(ctx, { status: 'in-training', effectiveOn: '2026-02-28' }, today).effectiveOn).toContain('2026-03-01')
  })
  it('refuses a date before birth and a change to the same status', () => {
    const p = statusChangeProblems({ ...ctx, latestChangeOn: null }, { status: 'assessment', effectiveOn: '2024-01-01' }, today)
    expect(p.effectiveOn).toMatch(/date of birth/)
    expect(p.status).toMatch(/already/)
  })
  it("starts training or placement only after an 'accept' assessment", () => {
    for (const outcome of [null, 'decline', 'reassess'] as const) {
      const c = { ...ctx, latestAssessmentOutcome: outcome }
      expect(statusChangeProblems(c, { status: 'in-training', effectiveOn: today }, today).status).toBe(ACCEPT_BEFORE_TRAINING)
      expect(statusChangeProblems(c, { status: 'placed', effectiveOn: today }, today).status).toBe(ACCEPT_BEFORE_PLACING)
      expect(statusChangeProblems(c, { status: 'withdrawn', effectiveOn: today }, today)).toEqual({})
    }
    // The rule is about leaving assessment: a dog already in training may be placed.
    expect(statusChangeProblems({ ...ctx, current: 'in-training', latestAssessmentOutcome: null }, { status: 'placed', effectiveOn: today }, today)).toEqual({})
  })
  it('checks recorded days against today and birth', () => {
    expect(pastDayProblem('2026-05-16', today, null, 'The date it was done')).toMatch(/^The date it was done cannot be in the future/)
    expect(pastDayProblem('2024-01-31', today, '2024-02-01', 'The assessment date')).toMatch(/before the dog's date of birth/)
    expect(pastDayProblem('2026-05-15', today, '2024-02-01', 'x')).toBeNull()
  })
})

describe('microchip numbers (ISO 11784/11785: 15 digits, from memory)', () => {
  it('accepts 15 digits, ignoring the spaces and hyphens people type', () => {
    expect(isValidMicrochip('999000000012345')).toBe(true)
    expect(isValidMicrochip('999 000 000 012 345')).toBe(true)
    expect(normalizeMicrochip('999-000.000 012345')).toBe('999000000012345')
  })
  it('refuses other lengths and letters', () => {
    expect(isValidMicrochip('99900000001234')).toBe(false) // 14 digits
    expect(isValidMicrochip('9990000000123456')).toBe(false) // 16
    expect(isValidMicrochip('99900000001234A')).toBe(false)
  })
})

describe('form schemas', () => {
  it('cleans a new dog: blanks become null, the chip loses its spaces', () => {
    const v = dogCreateSchema.parse({ name: ' Juniper ', breed: '', sex: 'female', dateOfBirth: '', microchip: '999 000 000 012 345', source: '', notes: '', startedOn: '' })
    expect(v).toEqual({ name: 'Juniper', breed: null, sex: 'female', dateOfBirth: null, microchip: '999000000012345', source: null, notes: null, startedOn: null })
  })
  it('names the fields that are wrong', () => {
    const r = dogCreateSchema.safeParse({ name: '', sex: 'other', dateOfBirth: '2025-02-30', microchip: '12345', source: 'shop' })
    expect(r.success).toBe(false)
    const fields = r.error!.issues.map(i => i.path.join('.'))
    expect(fields).toEqual(expect.arrayContaining(['name', 'sex', 'dateOfBirth', 'microchip', 'source']))
    expect(r.error!.issues.find(i => i.path[0] === 'microchip')!.message).toMatch(/15 digits/)
  })
  it('updates only what is sent and refuses unknown or empty changes', () => {
    expect(dogUpdateSchema.parse({ breed: 'Labrador Retriever' })).toEqual({ breed: 'Labrador Retriever' })
    expect(dogUpdateSchema.parse({ microchip: '' })).toEqual({ microchip: null })
    expect(dogUpdateSchema.safeParse({}).success).toBe(false)
    expect(dogUpdateSchema.safeParse({ status: 'placed' }).success).toBe(false)
  })
  it('needs a status and a real date for a status change', () => {
    expect(dogStatusChangeSchema.safeParse({ status: 'in-training' }).success).toBe(false)
    expect(dogStatusChangeSchema.parse({ status: 'in-training', effectiveOn: '2026-05-01' })).toEqual({ status: 'in-training', effectiveOn: '2026-05-01', note: null })
  })
  it('keeps a renewal date on or after the day a record was done', () => {
    const base = { kind: 'vaccination', name: 'Rabies', doneOn: '2026-04-01' }
    expect(healthRecordSchema.parse({ ...base, dueOn: '' }).dueOn).toBeNull()
    const bad = healthRecordSchema.safeParse({ ...base, dueOn: '2026-03-31' })
    expect(bad.error!.issues[0]!.path).toEqual(['dueOn'])
    expect(healthRecordUpdateSchema.safeParse({ doneOn: '2026-04-01', dueOn: '2026-03-01' }).success).toBe(false)
    expect(healthRecordUpdateSchema.parse({ dueOn: '2027-04-01' })).toEqual({ dueOn: '2027-04-01' })
  })
  const scores = { scentDrive: 4, focus: 4, environmentalConfidence: 4, sociability: 4, startleRecovery: 4, handlerEngagement: 4 }
  it('needs every trait scored 1 to 5', () => {
    expect(assessmentSchema.safeParse({ assessedOn: '2026-05-01', scores, outcome: 'accept' }).success).toBe(true)
    const missing = assessmentSchema.safeParse({ assessedOn: '2026-05-01', scores: { ...scores, focus: undefined }, outcome: 'accept' })
    expect(missing.error!.issues[0]!.path).toEqual(['scores', 'focus'])
    expect(assessmentSchema.safeParse({ assessedOn: '2026-05-01', scores: { ...scores, focus: 6 }, outcome: 'accept' }).success).toBe(false)
    expect(assessmentSchema.safeParse({ assessedOn: '2026-05-01', scores: { ...scores, focus: 2.5 }, outcome: 'accept' }).success).toBe(false)
    expect(assessmentSchema.safeParse({ assessedOn: '2026-05-01', scores: { ...scores, loyalty: 5 }, outcome: 'accept' }).success).toBe(false)
  })
  it('asks for a reason in the notes when accepting a dog with a trait below 3', () => {
    const weak = { ...scores, sociability: 2 }
    const r = assessmentSchema.safeParse({ assessedOn: '2026-05-01', scores: weak, outcome: 'accept' })
    expect(r.error!.issues[0]!.path).toEqual(['notes'])
    expect(assessmentSchema.safeParse({ assessedOn: '2026-05-01', scores: weak, outcome: 'accept', notes: 'Shy at first; improving fast with exposure.' }).success).toBe(true)
    expect(assessmentSchema.safeParse({ assessedOn: '2026-05-01', scores: weak, outcome: 'reassess' }).success).toBe(true)
  })
})

describe('display helpers', () => {
  it('formats calendar days, chips and profile paths', async () => {
    const { formatCalendarDay, formatMicrochip, dogProfilePath } = await import('../../shared/utils/dogs')
    expect(formatCalendarDay('2026-03-01')).toBe('1 Mar 2026')
    expect(formatCalendarDay(null)).toBe('—')
    expect(formatMicrochip('999000000010001')).toBe('999 000 000 010 001')
    expect(dogProfilePath('handler', 'abc')).toBe('/handler/dogs/abc')
  })
})
