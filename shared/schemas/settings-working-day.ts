// The working day's policies: which reminder e-mails go out and when, and when the office is told a client has
// gone quiet.
import { z } from 'zod'
import { defineSetting } from './settings'

const yesNo = z.boolean({ invalid_type_error: 'Choose yes or no.' })
export const workingDayPolicySchema = z.object({
  appointmentReminders: yesNo,
  appointmentHoursBefore: z.coerce.number().int('Use whole hours.').min(1, 'Use at least 1 hour.').max(168, 'Use at most 168 hours (a week).'),
  homeworkDueReminders: yesNo,
  sampleRenewalReminders: yesNo,
  sampleRenewalDays: z.coerce.number().int('Use whole days.').min(1, 'Use at least 1 day.').max(60, 'Use at most 60 days.'),
  invoiceDueReminders: yesNo,
  invoiceDueDays: z.coerce.number().int('Use whole days.').min(1, 'Use at least 1 day.').max(30, 'Use at most 30 days.'),
  messageNotices: yesNo,
  quietClientDays: z.coerce.number().int('Use whole days.').min(3, 'Use at least 3 days.').max(365, 'Use at most 365 days.'),
})
export type WorkingDayPolicy = z.infer<typeof workingDayPolicySchema>

export const WORKING_DAY_POLICY_KEY = 'working-day'
export const WORKING_DAY_POLICY_DEFAULTS: WorkingDayPolicy = {
  appointmentReminders: true,
  appointmentHoursBefore: 24, // the day before (common practice for appointment reminders)
  homeworkDueReminders: true, // the day before it is due (common practice)
  sampleRenewalReminders: true,
  sampleRenewalDays: 14, // two weeks leaves time to collect under the protocol (common practice)
  invoiceDueReminders: true,
  invoiceDueDays: 3, // a few days before the due date (common practice)
  messageNotices: true,
  quietClientDays: 21, // three weeks without a session, visit, message or review (common practice)
}

export const workingDayPolicy = defineSetting(WORKING_DAY_POLICY_KEY, {
  label: 'Reminders and the working day',
  description: 'Which reminder e-mails go out and when (each person can also switch each kind off in their account), and after how many days without any trainer activity a client is listed on the office\'s Today screen.',
  schema: workingDayPolicySchema,
  defaults: WORKING_DAY_POLICY_DEFAULTS,
  fieldLabels: {
    appointmentReminders: 'Remind households of appointments',
    appointmentHoursBefore: 'Hours before the appointment',
    homeworkDueReminders: 'Remind households of homework due tomorrow',
    sampleRenewalReminders: 'Remind households of samples to renew',
    sampleRenewalDays: 'Days ahead for sample renewal',
    invoiceDueReminders: 'Remind households of invoices falling due',
    invoiceDueDays: 'Days before the due date',
    messageNotices: 'E-mail people about new messages',
    quietClientDays: 'Days without trainer activity before the office is told',
  },
})
