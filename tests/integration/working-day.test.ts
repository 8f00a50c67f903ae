// The working day through the API: booking and its bad input, series moved and cancelled, the calendar feed parsed
// back by an independent parser (ical.js), reminders written once, messages scoped, and the Today lists.
import { createClient as libsql } from '@libsql/client'
import ICAL from 'ical.js'
import { beforeAll, describe, expect, inject, it } from 'vitest'
import { seedId } from '../../scripts/lib/seed-data'
import { addDays } from '../../shared/utils/invoices'
import { mondayOf, wallTimeOf } from '../../shared/utils/schedule'
import { minimalPdf, tinyPng } from '../support/files'
import { inbox, signIn, waitForMail, type Agent } from '../support/http'
import { ADMIN, CLIENT_A, CLIENT_B, HANDLER_A, HANDLER_B, TRAINER_A, TRAINER_B } from '../support/people'
import { resetDatabase } from '../support/stack'

const baseUrl = inject('baseUrl')
const mailUrl = inject('mailUrl')
const databaseUrl = inject('databaseUrl')
const ZONE = 'Europe/London' // the demo business's zone (scripts/lib/seed-data.ts)
const DOG_A = seedId('dog:fairweather')
const DOG_B = seedId('dog:achterberg')

async function rows(sql: string, args: (string | number)[] = []) {
  const db = libsql({ url: databaseUrl })
  try { return (await db.execute({ sql, args })).rows }
  finally { db.close() }
}
const count = async (table: string, where = '1=1', args: (string | number)[] = []) => Number((await rows(`select count(*) n from ${table} where ${where}`, args))[0]!.n)

const today = () => wallTimeOf(new Date(), ZONE).date
/** A Tuesday two weeks ahead: clear of the seeded fortnight. */
const farTuesday = () => addDays(mondayOf(today()), 15)

let trainer: Agent, trainerB: Agent, handler: Agent, handlerB: Agent, admin: Agent
beforeAll(async () => {
  await resetDatabase(databaseUrl)
  await signInAll()
})

async function signInAll() {
  const agents = await Promise.all([TRAINER_A, TRAINER_B, HANDLER_A, HANDLER_B, ADMIN].map(e => signIn(baseUrl, e)))
  ;[trainer, trainerB, handler, handlerB, admin] = agents as [Agent, Agent, Agent, Agent, Agent]
}

async function book(agent: Agent, body: Record<string, unknown>) {
  const res = await agent.post('/api/appointments', body)
  expect(res.status, JSON.stringify(res.body)).toBe(201)
  return res.body as { appointment: { id: string, seriesId: string | null, startsAt: string }, visits: number, conflicts: { id: string }[] }
}

/** The feed's text with folded lines joined again (RFC 5545 3.1), for plain searches. */
const unfold = (text: string) => text.replace(/\r\n[ \t]/g, '')

function parseFeed(text: string) {
  const comp = new ICAL.Component(ICAL.parse(text))
  for (const tz of comp.getAllSubcomponents('vtimezone')) ICAL.TimezoneService.register(new ICAL.Timezone(tz))
  return { comp, events: comp.getAllSubcomponents('vevent') }
}

describe('booking', () => {
  it('refuses bad input with a 4xx naming the problem, and writes nothing', async () => {
    const before = await count('appointments')
    const base = { clientId: CLIENT_A, kind: 'home-visit', date: farTuesday(), time: '10:00' }
    const cases: [Record<string, unknown>, RegExp][] = [
      [{ endTime: '09:00' }, /must be after the start/],
      [{ durationMinutes: 0 }, /at least 5 minutes/],
      [{ durationMinutes: 13 * 60 }, /at most 12 hours/],
      [{ endTime: '11:00', repeat: { everyWeeks: 1 } }, /when the series ends/],
      [{ endTime: '11:00', repeat: { everyWeeks: 1, count: 120 } }, /two years/],
      [{ endTime: '11:00', repeat: { everyWeeks: 1, untilDate: addDays(farTuesday(), 800) } }, /two years/],
      [{ date: '2027-03-28', time: '01:30', endTime: '02:45' }, /does not exist .* clocks go forward/],
      [{ endTime: '11:00', dogId: DOG_B }, /not on this client's file/],
      [{ endTime: '11:00', date: '2026-02-30' }, /does not exist on the calendar/],
    ]
    for (const [extra, message] of cases) {
      const res = await trainer.post('/api/appointments', { ...base, ...extra })
      expect(res.status, JSON.stringify(extra)).toBe(422)
      expect(res.body.message, JSON.stringify(extra)).toMatch(message)
    }
    expect((await trainer.post('/api/appointments', { ...base, endTime: '11:00', clientId: CLIENT_B })).status).toBe(404)
    expect((await handler.post('/api/appointments', { ...base, endTime: '11:00' })).status).toBe(403)
    expect(await count('appointments')).toBe(before)
  })

  it('books a weekly series, previews it first and warns (never refuses) about an overlap', async () => {
    const body = { clientId: CLIENT_A, dogId: DOG_A, kind: 'training', date: farTuesday(), time: '10:00', endTime: '11:00', place: 'Ashcombe field', householdNotes: 'Bring the cool bag.', privateNotes: 'Try blind.', repeat: { everyWeeks: 1, count: 4 } }
    const preview = await trainer.post('/api/appointments/preview', body)
    expect(preview.status).toBe(200)
    expect(preview.body.visits).toHaveLength(4)
    expect(preview.body.conflicts).toEqual([])
    const booked = await book(trainer, body)
    expect(booked.visits).toBe(4)
    expect(await count('appointments', 'series_id = ?', [booked.appointment.seriesId!])).toBe(4)
    // A second visit at 10:30 the same day overlaps the first: booked, with the overlap named.
    const overlapping = await book(trainer, { clientId: seedId('client:lindgren'), kind: 'home-visit', date: farTuesday(), time: '10:30', endTime: '11:30' })
    expect(overlapping.conflicts.map(c => c.id)).toContain(booked.appointment.id)
    // The household hears of the booking at once, with the visit as a calendar file.
    const mail = await waitForMail(mailUrl, HANDLER_A, 'Training session is booked')
    expect(mail.text).toContain('3 more visits of the series')
    const full = await (await fetch(`${mailUrl}/api/messages/${mail.id}`)).json() as { attachments?: { filename: string, contentType: string }[] }
    expect(full.attachments?.map(a => a.filename)).toContain('appointment.ics')
  })

  it('shows a handler their household\'s visits without private notes, and nothing of another household', async () => {
    const q = `from=${farTuesday()}&to=${addDays(farTuesday(), 30)}`
    const mine = await handler.get(`/api/appointments?${q}`)
    expect(mine.status).toBe(200)
    expect(mine.body.rows.length).toBeGreaterThanOrEqual(4)
    expect(mine.body.rows.every((r: { clientId: string }) => r.clientId === CLIENT_A)).toBe(true)
    expect(mine.body.rows.some((r: Record<string, unknown>) => 'privateNotes' in r)).toBe(false)
    const other = await handlerB.get(`/api/appointments?${q}`)
    expect(other.body.rows.some((r: { clientId: string }) => r.clientId === CLIENT_A)).toBe(false)
    expect((await trainer.get(`/api/appointments?${q}`)).body.rows.find((r: { privateNotes?: string }) => r.privateNotes === 'Try blind.')).toBeTruthy()
    expect((await trainer.get(`/api/appointments?from=${farTuesday()}&to=${addDays(farTuesday(), 90)}`)).status).toBe(400)
  })
})

describe('moving and cancelling, and the feed parsed back', () => {
  let seriesId: string
  let visits: { id: string, startsAt: string }[]
  beforeAll(async () => {
    const booked = await book(trainer, { clientId: CLIENT_A, dogId: DOG_A, kind: 'home-visit', date: addDays(farTuesday(), 1), time: '14:00', endTime: '15:00', place: 'Home', privateNotes: 'Secret plan', repeat: { everyWeeks: 2, count: 3 } })
    seriesId = booked.appointment.seriesId!
    visits = (await trainer.get(`/api/appointments?from=${addDays(farTuesday(), 1)}&to=${addDays(farTuesday(), 40)}&clientId=${CLIENT_A}`)).body.rows
      .filter((r: { seriesId: string }) => r.seriesId === seriesId)
    expect(visits).toHaveLength(3)
  })

  it('moves one visit, then cancels the rest of the series; the feed shows an override and EXDATEs', async () => {
    const moved = await trainer.patch(`/api/appointments/${visits[0]!.id}`, { scope: 'one', time: '16:00', endTime: '17:00' })
    expect(moved.status, JSON.stringify(moved.body)).toBe(200)
    expect(wallTimeOf(new Date(moved.body.appointment.startsAt), ZONE).time).toBe('16:00')
    // What the change did not name stays as it was.
    expect(moved.body.appointment.place).toBe('Home')
    expect(moved.body.appointment.privateNotes).toBe('Secret plan')
    const cancelled = await trainer.post(`/api/appointments/${visits[1]!.id}/cancel`, { scope: 'following', reason: 'Trainer away' })
    expect(cancelled.body.visits).toBe(2)
    expect((await trainer.post(`/api/appointments/${visits[1]!.id}/cancel`, {})).status).toBe(409)
    expect((await handler.post(`/api/appointments/${visits[0]!.id}/cancel`, {})).status).toBe(403)
    expect((await trainerB.patch(`/api/appointments/${visits[0]!.id}`, { time: '09:00' })).status).toBe(404)

    const { body: feedInfo } = await handler.get('/api/calendar/feed')
    expect(feedInfo.url).toMatch(/^http.*\.ics$/)
    const res = await fetch(feedInfo.url)
    expect(res.status).toBe(200)
    expect(res.headers.get('content-type')).toContain('text/calendar')
    const text = await res.text()
    expect(unfold(text)).not.toContain('Secret plan')
    const { events } = parseFeed(text)
    const uid = `${seriesId}@forescent.app`
    const mine = events.filter(e => e.getFirstPropertyValue('uid') === uid)
    const master = mine.find(e => !e.hasProperty('recurrence-id'))!
    const rule = master.getFirstPropertyValue('rrule') as ICAL.Recur
    expect([rule.freq, rule.interval, rule.count]).toEqual(['WEEKLY', 2, 3])
    const dtstart = master.getFirstProperty('dtstart')!
    expect(dtstart.getParameter('tzid')).toBe(ZONE)
    expect((master.getFirstPropertyValue('dtstart') as ICAL.Time).toJSDate().toISOString()).toBe(new Date(visits[0]!.startsAt).toISOString())
    const exdates = master.getAllProperties('exdate').flatMap(p => p.getValues() as ICAL.Time[]).map(t => t.toJSDate().toISOString()).sort()
    expect(exdates).toEqual([visits[1]!.startsAt, visits[2]!.startsAt].map(s => new Date(s).toISOString()).sort())
    const override = mine.find(e => e.hasProperty('recurrence-id'))!
    expect((override.getFirstPropertyValue('recurrence-id') as ICAL.Time).toJSDate().toISOString()).toBe(new Date(visits[0]!.startsAt).toISOString())
    expect(wallTimeOf((override.getFirstPropertyValue('dtstart') as ICAL.Time).toJSDate(), ZONE).time).toBe('16:00')
    // ical.js expands the series to exactly what remains: one visit (the override's time wins on its day).
    const ev = new ICAL.Event(master, { exceptions: [override] })
    const it = ev.iterator()
    const left: string[] = []
    for (let next = it.next(); next; next = it.next()) left.push(ev.getOccurrenceDetails(next).startDate.toJSDate().toISOString())
    expect(left).toEqual([new Date(moved.body.appointment.startsAt).toISOString()])
    // A cancelled single visit stays in the feed as STATUS:CANCELLED.
    const single = await book(trainer, { clientId: CLIENT_A, kind: 'check-in', date: addDays(farTuesday(), 3), time: '09:00', durationMinutes: 30 })
    await trainer.post(`/api/appointments/${single.appointment.id}/cancel`, { reason: 'Poorly dog' })
    const again = parseFeed(await (await fetch(feedInfo.url)).text())
    const cancelledSingle = again.events.find(e => e.getFirstPropertyValue('uid') === `${single.appointment.id}@forescent.app`)!
    expect(cancelledSingle.getFirstPropertyValue('status')).toBe('CANCELLED')
  })

  it('keeps feeds private: another household sees none of it; a renewed or forged token answers 404', async () => {
    const { body: b } = await handlerB.get('/api/calendar/feed')
    const text = unfold(await (await fetch(b.url)).text())
    expect(text).not.toContain(seriesId)
    const { body: before } = await handler.get('/api/calendar/feed')
    const { body: after } = await handler.post('/api/calendar/feed/renew')
    expect(after.url).not.toBe(before.url)
    expect((await fetch(before.url)).status).toBe(404)
    expect((await fetch(after.url)).status).toBe(200)
    const forged = after.url.replace(/\.([\w-]+)\.ics$/, '.AAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAA.ics')
    expect((await fetch(forged)).status).toBe(404)
    expect((await fetch(`${baseUrl}/api/calendar/feeds/nonsense.ics`)).status).toBe(404)
    // The trainer's feed lists their own diary, with private notes.
    const own = await (await fetch((await trainer.get('/api/calendar/feed')).body.url)).text()
    expect(unfold(own)).toContain('Secret plan')
  })
})

describe('reminders', () => {
  it('writes each reminder once however often the job runs, with the visit attached', async () => {
    await resetDatabase(databaseUrl)
    admin = await signIn(baseUrl, ADMIN)
    trainer = await signIn(baseUrl, TRAINER_A)
    // A visit tomorrow-ish: within the 24 hours of the default policy.
    const soon = new Date(Date.now() + 6 * 3_600_000)
    const wall = wallTimeOf(soon, ZONE)
    const start = wall.time < '22:00' ? wall : wallTimeOf(new Date(Date.now() + 2 * 3_600_000), ZONE)
    const endMinutes = Number(start.time.slice(0, 2)) * 60 + Number(start.time.slice(3)) + 30
    const booked = await book(trainer, { clientId: CLIENT_A, kind: 'home-visit', date: start.date, time: start.time, endTime: `${String(Math.floor(endMinutes / 60) % 24).padStart(2, '0')}:${String(endMinutes % 60).padStart(2, '0')}` })
    for (let i = 0; i < 3; i++) expect((await admin.post('/api/reminders/run')).status).toBe(200)
    const key = `appointment-reminder:${booked.appointment.id}:%`
    expect(await count('outbox', 'dedupe_key like ?', [key])).toBe(1)
    const mail = await waitForMail(mailUrl, HANDLER_A, 'Reminder: Home visit')
    const full = await (await fetch(`${mailUrl}/api/messages/${mail.id}`)).json() as { attachments?: { filename: string }[] }
    expect(full.attachments?.map(a => a.filename)).toContain('appointment.ics')
    // Moved, it is reminded again at its new time (once).
    const later = wallTimeOf(new Date(new Date(booked.appointment.startsAt).getTime() + 60 * 60_000), ZONE)
    if (later.date === start.date && later.time < '23:00') {
      await trainer.patch(`/api/appointments/${booked.appointment.id}`, { time: later.time, durationMinutes: 30 })
      await admin.post('/api/reminders/run')
      await admin.post('/api/reminders/run')
      expect(await count('outbox', 'dedupe_key like ?', [key])).toBe(2)
    }
    // Only the office runs the job by hand.
    expect((await trainer.post('/api/reminders/run')).status).toBe(403)
  })

  it('leaves out a person who switched a kind off, and refuses kinds that do not concern them', async () => {
    const h = await signIn(baseUrl, HANDLER_A)
    const off = await h.request('PUT', '/api/account/reminders', { 'homework-due': false })
    expect(off.status).toBe(200)
    expect(off.body.kinds.find((k: { kind: string }) => k.kind === 'homework-due').enabled).toBe(false)
    const wrong = await trainer.request('PUT', '/api/account/reminders', { 'invoice-due': false })
    expect(wrong.status).toBe(422)
    // A homework due tomorrow: the household has switched these off, so none is written.
    const tomorrow = addDays(today(), 1)
    await rows('update homework_assignments set due_day = ? where client_id = ? and state = \'open\'', [tomorrow, CLIENT_A])
    await admin.post('/api/reminders/run')
    expect(await count('outbox', 'dedupe_key like ?', ['homework-due:%'])).toBe(0)
    await h.request('PUT', '/api/account/reminders', { 'homework-due': true })
    await admin.post('/api/reminders/run')
    await admin.post('/api/reminders/run')
    const open = Number((await rows('select count(*) n from homework_assignments where client_id = ? and state = \'open\'', [CLIENT_A]))[0]!.n)
    expect(await count('outbox', 'dedupe_key like ?', ['homework-due:%'])).toBe(open)
  })
})

describe('messages', () => {
  beforeAll(async () => {
    await resetDatabase(databaseUrl)
    await signInAll()
  })

  it('lets the household write to its trainer; another household and trainer get 404; the trainer\'s Today shows it unread', async () => {
    const before = (await trainer.get('/api/today')).body.trainer.messages.find((m: { clientId: string }) => m.clientId === CLIENT_A)?.unread ?? 0
    const sent = await handler.post(`/api/clients/${CLIENT_A}/messages`, { body: 'Juniper alerted at the bus stop today.' })
    expect(sent.status).toBe(201)
    expect((await handlerB.post(`/api/clients/${CLIENT_A}/messages`, { body: 'hello' })).status).toBe(404)
    expect((await trainerB.get(`/api/clients/${CLIENT_A}/messages`)).status).toBe(404)
    expect((await handlerB.get(`/api/messages/${sent.body.id}/attachment`)).status).toBe(404)
    const today1 = (await trainer.get('/api/today')).body.trainer.messages.find((m: { clientId: string }) => m.clientId === CLIENT_A)
    expect(today1.unread).toBe(before + 1)
    expect((await trainer.get('/api/today/counts')).body.messages).toBeGreaterThanOrEqual(1)
    // Read: it leaves the Today list.
    await trainer.post(`/api/clients/${CLIENT_A}/messages/read`)
    expect((await trainer.get('/api/today')).body.trainer.messages.find((m: { clientId: string }) => m.clientId === CLIENT_A)).toBeUndefined()
    // The office reads and writes in every conversation.
    expect((await admin.get(`/api/clients/${CLIENT_A}/messages`)).body.rows.some((m: { body: string }) => m.body.includes('bus stop'))).toBe(true)
    expect((await admin.post(`/api/clients/${CLIENT_A}/messages`, { body: 'From the office: invoices are out.' })).status).toBe(201)
  })

  it('e-mails "you have a new message" without its content, at most once an hour per person', async () => {
    const notices = async () => (await inbox(mailUrl, TRAINER_A)).filter(m => m.subject === 'You have a new message in Forescent')
    const start = (await notices()).length
    await handler.post(`/api/clients/${CLIENT_A}/messages`, { body: 'A private detail about my migraine.' })
    await handler.post(`/api/clients/${CLIENT_A}/messages`, { body: 'And another one.' })
    const mail = await waitForMail(mailUrl, TRAINER_A, 'You have a new message in Forescent')
    expect(mail.text).not.toContain('migraine')
    await new Promise(r => setTimeout(r, 800))
    expect((await notices()).length).toBeLessThanOrEqual(Math.max(start, 1))
    expect(await count('message_notices', 'user_id = ?', [seedId('user:trainer')])).toBe(1)
  })

  it('refuses an over-long message and an attachment that is not what it claims, writing nothing', async () => {
    const before = await count('messages')
    const long = await handler.post(`/api/clients/${CLIENT_A}/messages`, { body: 'x'.repeat(10_001) })
    expect(long.status).toBe(422)
    expect(long.body.message).toMatch(/10,000 characters/)
    expect((await handler.post(`/api/clients/${CLIENT_A}/messages`, { body: '   ' })).status).toBe(422)
    const fake = new FormData()
    fake.append('body', 'Here is the letter')
    fake.append('file', new Blob([new TextEncoder().encode('#!/bin/sh\necho not a pdf\n')], { type: 'application/pdf' }), 'letter.pdf')
    const refused = await handler.request('POST', `/api/clients/${CLIENT_A}/messages`, fake)
    expect(refused.status).toBe(415)
    expect(await count('messages')).toBe(before)
    // A real PDF and a real PNG go through and come back only to the conversation's people.
    const pdf = new FormData()
    pdf.append('body', 'The vet letter')
    pdf.append('file', new Blob([minimalPdf('Vet letter (invented)')], { type: 'application/pdf' }), 'vet.pdf')
    const ok = await handler.request('POST', `/api/clients/${CLIENT_A}/messages`, pdf)
    expect(ok.status, JSON.stringify(ok.body)).toBe(201)
    const file = await trainer.get(`/api/messages/${ok.body.id}/attachment`)
    expect(file.status).toBe(200)
    expect(file.headers.get('content-type')).toBe('application/pdf')
    expect((await trainerB.get(`/api/messages/${ok.body.id}/attachment`)).status).toBe(404)
    const png = new FormData()
    png.append('body', 'Photo of the freezer compartment')
    png.append('file', new Blob([tinyPng()], { type: 'image/png' }), 'freezer.png')
    expect((await handler.request('POST', `/api/clients/${CLIENT_A}/messages`, png)).status).toBe(201)
  })

  it('lets a household reply about one of its own homework videos, not another household\'s', async () => {
    const [video] = await rows('select id from homework_videos where client_id = ? limit 1', [CLIENT_A])
    const [foreign] = await rows('select id from homework_videos where client_id <> ? limit 1', [CLIENT_A])
    if (video) {
      const res = await handler.post(`/api/clients/${CLIENT_A}/messages`, { body: 'About your comment at 0:12: got it.', homeworkVideoId: String(video.id) })
      expect(res.status).toBe(201)
      expect(res.body.homeworkVideoId).toBe(String(video.id))
    }
    if (foreign) expect((await handler.post(`/api/clients/${CLIENT_A}/messages`, { body: 'x', homeworkVideoId: String(foreign.id) })).status).toBe(422)
  })
})

describe('Today', () => {
  beforeAll(async () => {
    await resetDatabase(databaseUrl)
    await signInAll()
  })

  it('lists the trainer\'s own visits today (the seeded series visit and assessment), not another trainer\'s', async () => {
    const t = (await trainer.get('/api/today')).body.trainer
    const names = t.appointments.map((a: { householdName: string }) => a.householdName)
    expect(names).toContain('Fairweather household')
    expect(names).not.toContain('Achterberg household')
    const training = t.appointments.find((a: { kind: string }) => a.kind === 'training')
    expect(training.logSessionUrl).toContain(`/trainer/clients/${CLIENT_A}/training?appointment=`)
    // An alert not yet reviewed appears; reviewing every one removes it.
    const alerts = t.alerts.find((a: { clientId: string }) => a.clientId === CLIENT_A)
    if (alerts) {
      const ids = await rows('select id from diary_entries where client_id = ? and kind = \'alert\' and reviewed_at is null', [CLIENT_A])
      for (const r of ids) expect((await trainer.post(`/api/diary-entries/${r.id}/review`, { comment: 'Seen.' })).status).toBe(200)
      expect((await trainer.get('/api/today')).body.trainer.alerts.find((a: { clientId: string }) => a.clientId === CLIENT_A)).toBeUndefined()
    }
    expect((await trainerB.get('/api/today')).body.trainer.appointments.map((a: { householdName: string }) => a.householdName)).toContain('Achterberg household')
  })

  it('shows the household its next visit, and a sample out of the freezer until it is put back', async () => {
    const h = (await handler.get('/api/today')).body.household
    expect(h.households).toHaveLength(1)
    const card = h.households[0]
    expect(card.nextAppointment.clientId).toBe(CLIENT_A)
    expect(card.nextAppointment.privateNotes).toBeUndefined()
    const bank = (await handler.get(`/api/clients/${CLIENT_A}/samples`)).body
    const sample = bank.samples.find((s: { state: string, kind: string }) => s.state === 'ready' && s.kind === 'control')
    const out = await handler.post(`/api/samples/${sample.id}/uses`, { outAt: new Date(Date.now() - 2 * 60_000).toISOString(), stage: 'discrimination' })
    expect(out.status, JSON.stringify(out.body)).toBe(201)
    const withOut = (await handler.get('/api/today')).body.household.households[0]
    expect(withOut.samples.out.map((s: { id: string }) => s.id)).toContain(sample.id)
    expect(withOut.samples.out.find((s: { id: string }) => s.id === sample.id).minutesOut).toBeGreaterThanOrEqual(2)
    const useId = out.body.use?.id ?? out.body.id
    const back = await handler.request('PATCH', `/api/sample-uses/${useId}`, { backAt: new Date().toISOString() })
    expect(back.status, JSON.stringify(back.body)).toBe(200)
    expect((await handler.get('/api/today')).body.household.households[0].samples.out.map((s: { id: string }) => s.id)).not.toContain(sample.id)
  })

  it('gives the office overdue invoices, pending invitations and every trainer\'s day; a trainer gets no office list', async () => {
    const o = (await admin.get('/api/today')).body.office
    expect(o.trainers.map((t: { name: string }) => t.name)).toEqual(expect.arrayContaining(['Maren Holt', 'Tobias Quennell']))
    const maren = o.trainers.find((t: { name: string }) => t.name === 'Maren Holt')
    expect(maren.appointments.length).toBeGreaterThanOrEqual(2)
    expect(Array.isArray(o.overdueInvoices)).toBe(true)
    expect(Array.isArray(o.invitations)).toBe(true)
    // Fairweather had a training session and a visit this week (seeded): it is not a quiet household.
    expect(o.quietClients.map((q: { householdName: string }) => q.householdName)).not.toContain('Fairweather household')
    const asTrainer = (await trainer.get('/api/today')).body
    expect(asTrainer.office).toBeNull()
    expect((await handler.get('/api/today')).body.trainer).toBeNull()
  })
})
