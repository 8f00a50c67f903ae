// Homework: when an assignment is due or overdue (in the business's time zone), the order of the trainer's review
// queue, whether a comment's time lies inside its video, when an assignment is complete, and the plain-language
// summary of a review for the handler's e-mail. No database, no HTTP.

export const ASSIGNMENT_STATES = ['open', 'done', 'cancelled'] as const
export type AssignmentState = (typeof ASSIGNMENT_STATES)[number]
export const REVIEW_OUTCOMES = ['approved', 'try_again'] as const
export type ReviewOutcome = (typeof REVIEW_OUTCOMES)[number]
export const REVIEW_OUTCOME_LABELS: Record<ReviewOutcome, string> = { approved: 'Approved', try_again: 'Try again' }

/** Due within this many days (today included) shows as "due soon" (our own choice). */
export const HOMEWORK_DUE_SOON_DAYS = 2
/** A video waiting longer than this for its review shows as overdue in the queue (our own choice: a working week's half). */
export const REVIEW_WITHIN_DAYS = 3
/** At most this many videos for one assignment (our own limit: a session rarely needs more takes). */
export const MAX_EXPECTED_VIDEOS = 10
/**
 * A browser's currentTime at the very end can pass the duration read from the container by a frame or so (from
 * memory: media timelines round to the frame, about 1/25 to 1/60 s); we allow a tenth of a second.
 */
export const END_TOLERANCE_SECONDS = 0.1

const DAY_MS = 86_400_000

/** Today's calendar day (YYYY-MM-DD) in a time zone; an unknown zone falls back to UTC. */
export function dayInZone(timeZone: string, now: Date = new Date()): string {
  try {
    return new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' }).format(now)
  }
  catch {
    return now.toISOString().slice(0, 10)
  }
}

/** Whole days from `from` to `to` (both YYYY-MM-DD); negative when `to` is earlier. */
export function daysBetween(from: string, to: string): number {
  return Math.round((Date.parse(`${to}T00:00:00Z`) - Date.parse(`${from}T00:00:00Z`)) / DAY_MS)
}

export function dayPlus(day: string, n: number): string {
  return new Date(Date.parse(`${day}T00:00:00Z`) + n * DAY_MS).toISOString().slice(0, 10)
}

export type HomeworkDueState = 'done' | 'cancelled' | 'overdue' | 'due-today' | 'due-soon' | 'upcoming'

export interface HomeworkDueInfo { state: HomeworkDueState, days: number, label: string }

/** Where an assignment stands against its due day, with a short label ("Due tomorrow", "2 days overdue"). */
export function assignmentDue(a: { dueDay: string, state: AssignmentState }, today: string): HomeworkDueInfo {
  const days = daysBetween(today, a.dueDay)
  if (a.state === 'done') return { state: 'done', days, label: 'Done' }
  if (a.state === 'cancelled') return { state: 'cancelled', days, label: 'Cancelled' }
  if (days < 0) return { state: 'overdue', days, label: days === -1 ? '1 day overdue' : `${-days} days overdue` }
  if (days === 0) return { state: 'due-today', days, label: 'Due today' }
  if (days < HOMEWORK_DUE_SOON_DAYS) return { state: 'due-soon', days, label: 'Due tomorrow' }
  if (days <= HOMEWORK_DUE_SOON_DAYS) return { state: 'due-soon', days, label: `Due in ${days} days` }
  return { state: 'upcoming', days, label: `Due in ${days} days` }
}

/** A due day a trainer sets must not lie in the past (today is fine). Null when it is fine. */
export function dueDayProblem(dueDay: string, today: string): string | null {
  return dueDay < today ? `The due date cannot be in the past: use ${today} or later.` : null
}

/** Open assignments first, soonest due first; then done and cancelled ones, latest due first. */
export function compareAssignments(a: { dueDay: string, state: AssignmentState, createdAt: Date | number }, b: typeof a): number {
  const openA = a.state === 'open' ? 0 : 1
  const openB = b.state === 'open' ? 0 : 1
  if (openA !== openB) return openA - openB
  if (a.dueDay !== b.dueDay) return openA === 0 ? (a.dueDay < b.dueDay ? -1 : 1) : (a.dueDay < b.dueDay ? 1 : -1)
  return +a.createdAt - +b.createdAt
}

export type HomeworkQueueState = 'awaiting' | 'overdue' | 'reviewed'

/** A video's place in the review queue: reviewed, waiting, or waiting too long. */
export function reviewState(v: { reviewedAt: Date | number | null, createdAt: Date | number }, now: Date = new Date()): HomeworkQueueState {
  if (v.reviewedAt !== null) return 'reviewed'
  return +now - +v.createdAt > REVIEW_WITHIN_DAYS * DAY_MS ? 'overdue' : 'awaiting'
}

/**
 * The review queue's order: videos waiting for review first, the oldest submission first; then reviewed ones, the
 * latest review first. (server/services/homework-review.ts orders the same way in SQL.)
 */
export function compareQueue(a: { reviewedAt: Date | number | null, createdAt: Date | number, id: string }, b: typeof a): number {
  if (a.reviewedAt === null && b.reviewedAt !== null) return -1
  if (a.reviewedAt !== null && b.reviewedAt === null) return 1
  const diff = a.reviewedAt === null ? +a.createdAt - +b.createdAt : +b.reviewedAt! - +a.reviewedAt!
  if (diff) return diff
  return a.id < b.id ? -1 : a.id > b.id ? 1 : 0
}

/**
 * Whether a comment may be pinned at `atSeconds` of a video `durationSeconds` long (null: the length could not be
 * read, so only a negative time is refused). Null when it is fine, else a message a person can act on.
 */
export function commentTimeProblem(atSeconds: number, durationSeconds: number | null): string | null {
  if (!Number.isFinite(atSeconds)) return 'Give the moment of the video as a number of seconds.'
  if (atSeconds < 0) return 'A comment cannot be before the start of the video.'
  if (durationSeconds !== null && Number.isFinite(durationSeconds) && atSeconds > durationSeconds + END_TOLERANCE_SECONDS) {
    return `The video is only ${formatClock(durationSeconds)} long: pin the comment at ${formatClock(durationSeconds)} or earlier.`
  }
  return null
}

/** 12 → "0:12", 75.4 → "1:15", 3725 → "1:02:05" (seconds rounded down). */
export function formatClock(seconds: number): string {
  const s = Math.max(0, Math.floor(Number.isFinite(seconds) ? seconds : 0))
  const h = Math.floor(s / 3600)
  const m = Math.floor((s % 3600) / 60)
  const ss = String(s % 60).padStart(2, '0')
  return h ? `${h}:${String(m).padStart(2, '0')}:${ss}` : `${m}:${ss}`
}

export interface HomeworkCompletion { approved: number, expected: number, complete: boolean, stillNeeded: number }

/** An assignment is complete once as many of its videos are approved as it expects. */
export function assignmentCompletion(expectedVideos: number, videos: { reviewOutcome: ReviewOutcome | null }[]): HomeworkCompletion {
  const approved = videos.filter(v => v.reviewOutcome === 'approved').length
  const expected = Math.max(1, expectedVideos)
  return { approved, expected, complete: approved >= expected, stillNeeded: Math.max(0, expected - approved) }
}

/** The handler's view of one video: waiting for the trainer, approved, or to be tried again. */
export function videoStatusLabel(v: { reviewOutcome: ReviewOutcome | null }): string {
  if (v.reviewOutcome === 'approved') return 'Approved by your trainer'
  if (v.reviewOutcome === 'try_again') return 'Your trainer asks you to try again'
  return 'Waiting for your trainer'
}

export interface ReviewSummaryInput {
  assignmentTitle: string
  dogName: string | null
  outcome: ReviewOutcome
  notes: string | null
  comments: { atSeconds: number, body: string }[]
  completion: HomeworkCompletion
  next: { title: string, dueDay: string } | null
}

/** What the handler reads in the review e-mail: paragraphs in plain language, comments in time order. */
export function reviewSummary(r: ReviewSummaryInput): string[] {
  const dog = r.dogName ?? 'your dog'
  const out: string[] = []
  if (r.outcome === 'approved') {
    out.push(`Your trainer has watched your video for "${r.assignmentTitle}" and approved it. Well done to you and ${dog}.`)
  }
  else {
    out.push(`Your trainer has watched your video for "${r.assignmentTitle}" and asks you to try it again. That is a normal part of training, not a failure.`)
  }
  if (r.notes) out.push(`Your trainer's notes: ${r.notes}`)
  const comments = [...r.comments].sort((a, b) => a.atSeconds - b.atSeconds)
  if (comments.length) {
    out.push(`${comments.length === 1 ? 'One comment' : `${comments.length} comments`} at moments of the video:`)
    out.push(comments.map(c => `• at ${formatClock(c.atSeconds)}: ${c.body}`).join('\n'))
  }
  if (r.outcome === 'approved') {
    out.push(r.completion.complete
      ? 'This homework is now complete.'
      : `${r.completion.approved} of ${r.completion.expected} videos approved: ${r.completion.stillNeeded === 1 ? 'one more to go' : `${r.completion.stillNeeded} more to go`}.`)
  }
  else {
    out.push('Film another go when you are ready and send it on the same homework page.')
  }
  if (r.next) out.push(`Your next homework: "${r.next.title}", due ${dueDayLabel(r.next.dueDay)}. The instructions are on your homework page.`)
  out.push('A reminder: an alert dog supplements your medical care and never replaces it. Keep following your clinician\'s advice.')
  return out
}

// ---------------------------------------------------------------------------------------------------------------
// Upload progress: speed and time left from recent progress samples (the page keeps the samples)

export interface ProgressSample { at: number, bytes: number }
/** Speed is averaged over the last few seconds so it neither jumps at every chunk nor lags for minutes (our own choice). */
export const SPEED_WINDOW_MS = 8000

/** Bytes per second over the recent window and seconds left at that speed (null while there is too little to tell). */
export function transferStats(samples: ProgressSample[], total: number): { bytesPerSecond: number | null, secondsLeft: number | null } {
  if (samples.length < 2) return { bytesPerSecond: null, secondsLeft: null }
  const last = samples[samples.length - 1]!
  const first = samples.find(s => last.at - s.at <= SPEED_WINDOW_MS) ?? samples[0]!
  const ms = last.at - first.at
  const bytes = last.bytes - first.bytes
  if (ms < 500 || bytes <= 0) return { bytesPerSecond: null, secondsLeft: null }
  const bytesPerSecond = (bytes * 1000) / ms
  return { bytesPerSecond, secondsLeft: Math.max(0, (total - last.bytes) / bytesPerSecond) }
}

/** Keeps only the samples the speed needs (the window and one before it). */
export function trimSamples(samples: ProgressSample[], now: number): ProgressSample[] {
  const i = samples.findIndex(s => now - s.at <= SPEED_WINDOW_MS)
  return i <= 0 ? samples : samples.slice(i - 1)
}

/** 8 → "a few seconds left", 95 → "about 2 minutes left", 4000 → "about 1 hour 7 minutes left". */
export function timeLeftInWords(seconds: number | null): string {
  if (seconds === null || !Number.isFinite(seconds)) return 'working out the time left…'
  if (seconds < 10) return 'a few seconds left'
  if (seconds < 60) return `about ${Math.round(seconds / 5) * 5} seconds left`
  const minutes = Math.round(seconds / 60)
  if (minutes < 60) return `about ${minutes} ${minutes === 1 ? 'minute' : 'minutes'} left`
  const h = Math.floor(minutes / 60)
  const m = minutes % 60
  return `about ${h} ${h === 1 ? 'hour' : 'hours'}${m ? ` ${m} ${m === 1 ? 'minute' : 'minutes'}` : ''} left`
}

/** "2026-12-06" → "Sun 6 Dec" (this year) or "Sun 6 Dec 2027": a due day as people read it. */
export function dueDayLabel(day: string, today?: string): string {
  const d = new Date(`${day}T00:00:00Z`)
  if (Number.isNaN(d.getTime())) return day
  const sameYear = today ? today.slice(0, 4) === day.slice(0, 4) : false
  const part = (o: Intl.DateTimeFormatOptions) => new Intl.DateTimeFormat('en-GB', { ...o, timeZone: 'UTC' }).format(d)
  return [part({ weekday: 'short' }), part({ day: 'numeric' }), part({ month: 'short' }), ...(sameYear ? [] : [part({ year: 'numeric' })])].join(' ')
}

/** Whole calendar days from `then` to `now` on this machine's calendar (sent last night is 1, not 0). */
export function calendarDaysAgo(then: Date | number | string, now: Date = new Date()): number {
  const midnight = (d: Date) => new Date(d.getFullYear(), d.getMonth(), d.getDate()).getTime()
  return Math.round((midnight(now) - midnight(new Date(then))) / 86_400_000)
}

/** "today", "yesterday", "4 days ago". */
export function sentAgoLabel(then: Date | number | string, now: Date = new Date()): string {
  const d = calendarDaysAgo(then, now)
  return d <= 0 ? 'today' : d === 1 ? 'yesterday' : `${d} days ago`
}
