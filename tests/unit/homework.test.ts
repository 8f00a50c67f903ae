import { describe, expect, it } from 'vitest'
import { assignmentCreateSchema, commentSchema, reviewSchema } from '../../shared/schemas/homework'
import {
  END_TOLERANCE_SECONDS, REVIEW_WITHIN_DAYS, dayPlus, assignmentCompletion, assignmentDue, commentTimeProblem, compareAssignments,
  calendarDaysAgo, compareQueue, dayInZone, daysBetween, dueDayLabel, dueDayProblem, sentAgoLabel, formatClock, reviewState, reviewSummary, timeLeftInWords, transferStats, trimSamples,
} from '../../shared/utils/homework'

describe('dayInZone', () => {
  it('takes the calendar day of the business, not of UTC', () => {
    // 23:30 UTC on 31 March is already 1 April in London (summer time, UTC+1, from 29 March 2026: from memory) and still 31 March in New York.
    const instant = new Date('2026-03-31T23:30:00Z')
    expect(dayInZone('Europe/London', instant)).toBe('2026-04-01')
    expect(dayInZone('America/New_York', instant)).toBe('2026-03-31')
    expect(dayInZone('UTC', instant)).toBe('2026-03-31')
  })
  it('falls back to UTC for a zone it does not know', () => {
    expect(dayInZone('Not/AZone', new Date('2026-03-31T23:30:00Z'))).toBe('2026-03-31')
  })
})

describe('days', () => {
  it('counts whole calendar days across a month end and a clock change', () => {
    expect(daysBetween('2026-03-28', '2026-04-02')).toBe(5)
    expect(daysBetween('2026-04-02', '2026-03-28')).toBe(-5)
    expect(dayPlus('2026-02-27', 2)).toBe('2026-03-01')
  })
})

describe('assignmentDue', () => {
  const open = (dueDay: string) => ({ dueDay, state: 'open' as const })
  it('labels open homework against today', () => {
    expect(assignmentDue(open('2026-03-10'), '2026-03-10')).toEqual({ state: 'due-today', days: 0, label: 'Due today' })
    expect(assignmentDue(open('2026-03-11'), '2026-03-10')).toEqual({ state: 'due-soon', days: 1, label: 'Due tomorrow' })
    expect(assignmentDue(open('2026-03-12'), '2026-03-10')).toEqual({ state: 'due-soon', days: 2, label: 'Due in 2 days' })
    expect(assignmentDue(open('2026-03-20'), '2026-03-10')).toEqual({ state: 'upcoming', days: 10, label: 'Due in 10 days' })
    expect(assignmentDue(open('2026-03-09'), '2026-03-10')).toEqual({ state: 'overdue', days: -1, label: '1 day overdue' })
    expect(assignmentDue(open('2026-03-01'), '2026-03-10').label).toBe('9 days overdue')
  })
  it('never calls done or cancelled homework overdue', () => {
    expect(assignmentDue({ dueDay: '2026-03-01', state: 'done' }, '2026-03-10').state).toBe('done')
    expect(assignmentDue({ dueDay: '2026-03-01', state: 'cancelled' }, '2026-03-10').state).toBe('cancelled')
  })
})

describe('dueDayProblem', () => {
  it('refuses a day in the past and accepts today', () => {
    expect(dueDayProblem('2026-03-09', '2026-03-10')).toMatch(/cannot be in the past: use 2026-03-10 or later/)
    expect(dueDayProblem('2026-03-10', '2026-03-10')).toBeNull()
    expect(dueDayProblem('2027-01-01', '2026-03-10')).toBeNull()
  })
})

describe('compareAssignments', () => {
  it('puts open homework first, soonest due first, then closed homework latest first', () => {
    const rows = [
      { id: 'done-old', dueDay: '2026-01-01', state: 'done' as const, createdAt: 1 },
      { id: 'open-late', dueDay: '2026-04-01', state: 'open' as const, createdAt: 2 },
      { id: 'cancelled-new', dueDay: '2026-03-01', state: 'cancelled' as const, createdAt: 3 },
      { id: 'open-soon', dueDay: '2026-03-12', state: 'open' as const, createdAt: 4 },
    ]
    expect([...rows].sort(compareAssignments).map(r => r.id)).toEqual(['open-soon', 'open-late', 'cancelled-new', 'done-old'])
  })
})

describe('review queue', () => {
  const now = new Date('2026-03-10T12:00:00Z')
  const at = (iso: string) => new Date(iso)
  it('calls a video overdue once it waited longer than the review window', () => {
    expect(REVIEW_WITHIN_DAYS).toBe(3)
    expect(reviewState({ reviewedAt: null, createdAt: at('2026-03-08T12:00:00Z') }, now)).toBe('awaiting')
    expect(reviewState({ reviewedAt: null, createdAt: at('2026-03-07T11:59:00Z') }, now)).toBe('overdue')
    expect(reviewState({ reviewedAt: at('2026-03-09T09:00:00Z'), createdAt: at('2026-03-01T12:00:00Z') }, now)).toBe('reviewed')
  })
  it('orders waiting videos oldest first, then reviewed ones latest review first', () => {
    const rows = [
      { id: 'b', reviewedAt: null, createdAt: at('2026-03-09T10:00:00Z') },
      { id: 'r1', reviewedAt: at('2026-03-05T10:00:00Z'), createdAt: at('2026-03-01T10:00:00Z') },
      { id: 'a', reviewedAt: null, createdAt: at('2026-03-02T10:00:00Z') },
      { id: 'r2', reviewedAt: at('2026-03-08T10:00:00Z'), createdAt: at('2026-03-03T10:00:00Z') },
      { id: 'a2', reviewedAt: null, createdAt: at('2026-03-02T10:00:00Z') },
    ]
    expect([...rows].sort(compareQueue).map(r => r.id)).toEqual(['a', 'a2', 'b', 'r2', 'r1'])
  })
})

describe('commentTimeProblem', () => {
  it('accepts a moment inside the video, its very end and a frame past it', () => {
    expect(commentTimeProblem(0, 12.4)).toBeNull()
    expect(commentTimeProblem(12.4, 12.4)).toBeNull()
    expect(commentTimeProblem(12.4 + END_TOLERANCE_SECONDS, 12.4)).toBeNull()
  })
  it('refuses a moment past the end with the video length in the message', () => {
    expect(commentTimeProblem(13, 12.4)).toBe('The video is only 0:12 long: pin the comment at 0:12 or earlier.')
    expect(commentTimeProblem(600, 75)).toMatch(/only 1:15 long/)
  })
  it('refuses a negative moment, and only that when the length is unknown', () => {
    expect(commentTimeProblem(-1, 12)).toMatch(/before the start/)
    expect(commentTimeProblem(-0.5, null)).toMatch(/before the start/)
    expect(commentTimeProblem(99_999, null)).toBeNull()
    expect(commentTimeProblem(Number.NaN, 10)).toMatch(/number of seconds/)
  })
})

describe('formatClock', () => {
  it('writes minutes and seconds, and hours when there are any', () => {
    expect(formatClock(0)).toBe('0:00')
    expect(formatClock(12.9)).toBe('0:12')
    expect(formatClock(75.4)).toBe('1:15')
    expect(formatClock(3725)).toBe('1:02:05')
    expect(formatClock(-3)).toBe('0:00')
  })
})

describe('assignmentCompletion', () => {
  it('is complete when as many videos are approved as expected; try-again and waiting ones do not count', () => {
    expect(assignmentCompletion(2, [{ reviewOutcome: 'approved' }, { reviewOutcome: 'try_again' }, { reviewOutcome: null }]))
      .toEqual({ approved: 1, expected: 2, complete: false, stillNeeded: 1 })
    expect(assignmentCompletion(2, [{ reviewOutcome: 'approved' }, { reviewOutcome: 'approved' }]).complete).toBe(true)
    expect(assignmentCompletion(1, []).complete).toBe(false)
  })
})

describe('reviewSummary', () => {
  const base = { assignmentTitle: 'Two controls and one target', dogName: 'Juniper', notes: null, comments: [], next: null, completion: { approved: 1, expected: 1, complete: true, stillNeeded: 0 } }
  it('says approved, lists the comments in time order and names the next homework', () => {
    const text = reviewSummary({
      ...base, outcome: 'approved', notes: 'Clean line-up.',
      comments: [{ atSeconds: 40, body: 'Reward faster here.' }, { atSeconds: 12, body: 'Nice clear sit at the target.' }],
      next: { title: 'Kitchen proofing', dueDay: '2026-03-20' },
    }).join('\n')
    expect(text).toContain('approved it. Well done to you and Juniper.')
    expect(text).toContain('Your trainer\'s notes: Clean line-up.')
    expect(text.indexOf('at 0:12: Nice clear sit')).toBeLessThan(text.indexOf('at 0:40: Reward faster'))
    expect(text).toContain('This homework is now complete.')
    expect(text).toContain('Your next homework: "Kitchen proofing", due Fri 20 Mar 2026.')
    expect(text).toContain('never replaces it')
  })
  it('asks for another go without blame when the outcome is try again', () => {
    const text = reviewSummary({ ...base, outcome: 'try_again', notes: 'Hide the target lower.', completion: { approved: 0, expected: 1, complete: false, stillNeeded: 1 } }).join('\n')
    expect(text).toContain('asks you to try it again')
    expect(text).toContain('Film another go')
    expect(text).not.toContain('complete')
  })
  it('counts what is still to go when more videos are expected', () => {
    const text = reviewSummary({ ...base, outcome: 'approved', completion: { approved: 1, expected: 3, complete: false, stillNeeded: 2 } }).join('\n')
    expect(text).toContain('1 of 3 videos approved: 2 more to go.')
  })
})

describe('schemas', () => {
  it('needs a title and instructions unless the homework starts from an exercise', () => {
    const r = assignmentCreateSchema.safeParse({ dueDay: '2026-03-20', title: '', instructions: '' })
    expect(r.success).toBe(false)
    expect(r.error!.issues.map(i => i.path.join('.')).sort()).toEqual(['instructions', 'title'])
    const fromExercise = assignmentCreateSchema.parse({ dueDay: '2026-03-20', exerciseId: 'ex-1', title: '', expectedVideos: '' })
    expect(fromExercise).toMatchObject({ exerciseId: 'ex-1', title: undefined, expectedVideos: undefined, milestoneId: null })
  })
  it('refuses a negative comment time and a date that does not exist', () => {
    expect(commentSchema.safeParse({ atSeconds: -2, body: 'x' }).success).toBe(false)
    expect(assignmentCreateSchema.safeParse({ dueDay: '2026-02-30', title: 't', instructions: 'i' }).success).toBe(false)
  })
  it('asks for notes when the handler should try again', () => {
    const r = reviewSchema.safeParse({ outcome: 'try_again', notes: '' })
    expect(r.success).toBe(false)
    expect(r.error!.issues[0]!.path).toEqual(['notes'])
    expect(reviewSchema.parse({ outcome: 'approved' })).toEqual({ outcome: 'approved', notes: null, next: null })
  })
})

describe('upload progress', () => {
  it('measures the speed over the recent window and the time left at that speed', () => {
    // 10 MB in the first second (a burst), then 1 MB/s for 8 s: the window sees the steady speed.
    const samples = [{ at: 0, bytes: 0 }, { at: 1000, bytes: 10_000_000 }, ...Array.from({ length: 8 }, (_, i) => ({ at: 2000 + i * 1000, bytes: 11_000_000 + i * 1_000_000 }))]
    const s = transferStats(samples, 28_000_000)
    expect(s.bytesPerSecond).toBeCloseTo(1_000_000, -3)
    expect(s.secondsLeft).toBeCloseTo(10, 0)
  })
  it('says nothing until there is enough to tell', () => {
    expect(transferStats([{ at: 0, bytes: 0 }], 100)).toEqual({ bytesPerSecond: null, secondsLeft: null })
    expect(transferStats([{ at: 0, bytes: 0 }, { at: 100, bytes: 50 }], 100)).toEqual({ bytesPerSecond: null, secondsLeft: null })
    expect(transferStats([{ at: 0, bytes: 10 }, { at: 2000, bytes: 10 }], 100)).toEqual({ bytesPerSecond: null, secondsLeft: null })
  })
  it('keeps one sample before the window', () => {
    const samples = [{ at: 0, bytes: 0 }, { at: 1000, bytes: 1 }, { at: 9500, bytes: 2 }, { at: 10_000, bytes: 3 }]
    expect(trimSamples(samples, 10_000).map(s => s.at)).toEqual([1000, 9500, 10_000])
  })
  it('words the time left for a handler', () => {
    expect(timeLeftInWords(null)).toBe('working out the time left…')
    expect(timeLeftInWords(4)).toBe('a few seconds left')
    expect(timeLeftInWords(33)).toBe('about 35 seconds left')
    expect(timeLeftInWords(95)).toBe('about 2 minutes left')
    expect(timeLeftInWords(4000)).toBe('about 1 hour 7 minutes left')
  })
})

describe('dueDayLabel', () => {
  it('writes the weekday and date, with the year only when it is not this year', () => {
    // 6 December 2026 is a Sunday (calendar).
    expect(dueDayLabel('2026-12-06', '2026-12-02')).toBe('Sun 6 Dec')
    expect(dueDayLabel('2027-01-04', '2026-12-02')).toBe('Mon 4 Jan 2027')
    expect(dueDayLabel('nonsense')).toBe('nonsense')
  })
})

describe('sentAgoLabel', () => {
  it('counts calendar days, so last night is yesterday', () => {
    const now = new Date(2026, 11, 2, 4, 0)
    expect(sentAgoLabel(new Date(2026, 11, 2, 0, 30), now)).toBe('today')
    expect(sentAgoLabel(new Date(2026, 11, 1, 23, 30), now)).toBe('yesterday')
    expect(sentAgoLabel(new Date(2026, 10, 28, 12, 0), now)).toBe('4 days ago')
    expect(calendarDaysAgo(new Date(2026, 10, 28, 12, 0), now)).toBe(4)
  })
})
