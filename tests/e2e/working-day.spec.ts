// The working day on phones: the trainer books a repeating visit, the household sees it at home and in its own
// calendar feed (parsed back with ical.js), the reminder e-mail carries the visit as an .ics file, and a message
// from the household shows unread on the trainer's Today.
import { expect, test } from '@playwright/test'
import ICAL from 'ical.js'
import { signIn, waitForMail } from '../support/http'
import { ADMIN, CLIENT_A, HANDLER_A, TRAINER_A } from '../support/people'
import { resetDatabase } from '../support/stack'
import { wallTimeOf } from '../../shared/utils/schedule'
import { PHONE, shot, signInAs } from './helpers'

test('a repeating visit booked on a phone reaches the household, its calendar and its inbox; its message reaches the trainer', async ({ browser }) => {
  test.setTimeout(180_000)
  await resetDatabase(process.env.E2E_DATABASE_URL!)
  // Within the next day, so the reminder job (24 hours before, the default policy) picks it up: about 20 hours ahead.
  // (A visit ends on its own day: when 20 hours ahead falls in the 23:00 hour, 18 hours ahead is taken instead.)
  const ahead = [20, 18].map(h => wallTimeOf(new Date(Date.now() + h * 3_600_000), 'Europe/London')).find(w => w.time < '23:00')!
  const at = ahead
  const start = `${at.time.slice(0, 2)}:00`
  const end = `${String(Number(at.time.slice(0, 2)) + 1).padStart(2, '0')}:00`

  const trainerCtx = await browser.newContext({ viewport: PHONE })
  const trainer = await trainerCtx.newPage()
  await signInAs(trainer, TRAINER_A)
  await expect(trainer.getByRole('heading', { level: 1 })).toHaveText('Today')
  await trainer.goto('/trainer/calendar')
  await trainer.getByTestId('calendar-book').click()
  const form = trainer.getByTestId('appointment-form')
  await form.getByTestId('appointment-client').selectOption({ label: 'Fairweather household' })
  await expect(form.getByTestId('appointment-dog')).toHaveValue(/.+/)
  await form.getByTestId('appointment-kind').selectOption('home-visit')
  await form.getByTestId('appointment-date').fill(at.date)
  await form.getByTestId('appointment-time').fill(start)
  await form.getByTestId('appointment-end').fill(end)
  await form.getByTestId('appointment-place').fill('Fairweather home, Ashcombe')
  await form.getByTestId('appointment-repeats').check()
  await form.getByTestId('appointment-count').fill('3')
  await form.getByTestId('appointment-check').click()
  await expect(form.getByTestId('appointment-preview')).toContainText('This books 3 visits')
  await shot(trainer, 'working-day-booking-phone')
  await form.getByTestId('appointment-book').click()
  await expect(form).toBeHidden()

  // The household: its home shows the next visit, its visits page lists the three, and its own feed the series.
  const householdCtx = await browser.newContext({ viewport: PHONE })
  const household = await householdCtx.newPage()
  await signInAs(household, HANDLER_A)
  await expect(household.getByTestId('household-next-appointment')).toBeVisible()
  await shot(household, 'working-day-household-home-phone')
  await household.goto('/handler/calendar')
  await expect(household.getByTestId('appointment-item').filter({ hasText: 'Fairweather home, Ashcombe' })).toHaveCount(3)
  await expect(household.getByTestId('appointment-item').filter({ hasText: 'Fairweather home, Ashcombe' }).first()).toContainText(`${start}–${end}`)
  const feedUrl = await household.getByTestId('calendar-feed-url').inputValue()
  expect(feedUrl).toMatch(/\.ics$/)
  const feed = await fetch(feedUrl) // no cookie: the address is the key
  expect(feed.headers.get('content-type')).toContain('text/calendar')
  const cal = new ICAL.Component(ICAL.parse(await feed.text()))
  const series = cal.getAllSubcomponents('vevent').find(e => e.getFirstPropertyValue('location') === 'Fairweather home, Ashcombe')!
  expect((series.getFirstPropertyValue('rrule') as ICAL.Recur).count).toBe(3)
  expect(series.getFirstProperty('dtstart')!.getParameter('tzid')).toBe('Europe/London')

  // The reminder job (run by the office) e-mails the household the visit with its .ics attachment.
  const office = await signIn(process.env.E2E_BASE_URL!, ADMIN)
  expect((await office.post('/api/reminders/run')).status).toBe(200)
  const reminder = await waitForMail(process.env.E2E_MAIL_URL!, HANDLER_A, 'Reminder: Home visit')
  const full = await (await fetch(`${process.env.E2E_MAIL_URL}/api/messages/${reminder.id}`)).json() as { attachments: { filename: string, contentType: string }[] }
  expect(full.attachments.map(a => a.filename)).toContain('appointment.ics')

  // The household writes; the trainer's Today shows it unread.
  await household.goto(`/handler/messages/${CLIENT_A}`)
  await household.getByTestId('message-body').fill('Could we start ten minutes later tomorrow? The school run is late.')
  await household.getByTestId('message-send').click()
  await expect(household.getByTestId('message').last()).toContainText('ten minutes later')
  await shot(household, 'working-day-household-message-phone')
  await trainer.goto('/trainer')
  await expect(trainer.getByTestId('today-messages')).toContainText('Fairweather household')
  await shot(trainer, 'working-day-trainer-today-phone')
  await trainerCtx.close()
  await householdCtx.close()
})
