// Reminder e-mails: the kinds a person can switch off, and the pure "is it due now?" rules the reminder job applies.
export const REMINDER_KINDS = ['appointment', 'homework-due', 'sample-renewal', 'invoice-due', 'messages'] as const
export type ReminderKind = (typeof REMINDER_KINDS)[number]
export const REMINDER_KIND_LABELS: Record<ReminderKind, string> = {
  'appointment': 'Appointments: a reminder before each visit, and a notice when one is booked, moved or cancelled',
  'homework-due': 'Homework due tomorrow',
  'sample-renewal': 'Scent samples to renew within the next two weeks',
  'invoice-due': 'An invoice falling due in a few days',
  'messages': 'A new message (at most one e-mail an hour, never with the message itself)',
}
/** Which roles each kind concerns (staff see the rest on their Today screen). */
export const REMINDER_KINDS_FOR: Record<'admin' | 'trainer' | 'handler', readonly ReminderKind[]> = {
  handler: REMINDER_KINDS,
  trainer: ['appointment', 'messages'],
  admin: ['messages'],
}

/** Whether a person gets a kind: the office's switch first, then their own (no choice recorded: on). */
export function reminderEnabled(kind: ReminderKind, officeOn: boolean, own: boolean | undefined): boolean {
  return officeOn && own !== false
}

/** An appointment's reminder is due once we are within `hoursBefore` of its start and it has not started. */
export function appointmentReminderDue(startsAt: Date, hoursBefore: number, now: Date): boolean {
  const t = startsAt.getTime()
  return t > now.getTime() && t - now.getTime() <= hoursBefore * 3_600_000
}

/** The hour-long spell a "new message" e-mail belongs to: one e-mail per person per spell at most. */
export const MESSAGE_NOTICE_GAP_MS = 60 * 60 * 1000
export function messageNoticeDue(lastNoticedAt: Date | null, now: Date): boolean {
  return !lastNoticedAt || now.getTime() - lastNoticedAt.getTime() >= MESSAGE_NOTICE_GAP_MS
}
