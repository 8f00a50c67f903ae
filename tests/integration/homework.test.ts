import { createClient as libsql } from '@libsql/client'
import { beforeEach, describe, expect, inject, it } from 'vitest'
import { seedId } from '../../scripts/lib/seed-data'
import { linkIn, signIn, waitForMail, type Agent } from '../support/http'
import { CLIENT_A, CLIENT_B, HANDLER_A, TRAINER_A, TRAINER_B } from '../support/people'
import { resetDatabase } from '../support/stack'

const baseUrl = inject('baseUrl')
const mailUrl = inject('mailUrl')
const databaseUrl = inject('databaseUrl')

// Seeded homework (scripts/lib/seed-homework.ts).
const OPEN = seedId('assignment:fairweather:two-controls')
const DONE = seedId('assignment:fairweather:hold-alert')
const WAITING = seedId('video:fairweather:two-controls:1')
const APPROVED = seedId('video:fairweather:hold-alert:1')
const KITCHEN = seedId('exercise:kitchen-proofing')
const BLIND = seedId('exercise:blind-line-up')
const DISCRIMINATION_A = seedId('milestone:fairweather:3')
const MILESTONE_B = seedId('milestone:achterberg:1')

async function query(sql: string, args: (string | number)[] = []) {
  const db = libsql({ url: databaseUrl })
  try { return (await db.execute({ sql, args })).rows }
  finally { db.close() }
}
const count = async (table: string, where = '1=1', args: (string | number)[] = []) => Number((await query(`select count(*) n from ${table} where ${where}`, args))[0]!.n)
// Due days are calendar days of the business (Europe/London); a few days ahead or behind is the same day anywhere.
const inDays = (n: number) => new Date(Date.now() + n * 86_400_000).toISOString().slice(0, 10)

let trainer: Agent
beforeEach(async () => {
  await resetDatabase(databaseUrl)
  await fetch(`${mailUrl}/api/messages`, { method: 'DELETE' })
  trainer = await signIn(baseUrl, TRAINER_A)
})

describe('the exercise library', () => {
  it('adds, changes and archives an exercise; only its author and the office may change it', async () => {
    const created = await trainer.post('/api/homework-exercises', { title: 'Search the stairs', instructions: 'Hide one target on a step; film the search from the bottom.', expectedVideos: '2' })
    expect(created.status, JSON.stringify(created.body)).toBe(201)
    expect(created.body.expectedVideos).toBe(2)
    const other = await signIn(baseUrl, TRAINER_B)
    expect((await other.patch(`/api/homework-exercises/${created.body.id}`, { title: 'Mine now' })).status).toBe(403)
    expect((await trainer.patch(`/api/homework-exercises/${created.body.id}`, { title: 'Search the stairs, blind' })).body.title).toBe('Search the stairs, blind')
    expect((await trainer.delete(`/api/homework-exercises/${created.body.id}`)).status).toBe(200)
    const list = await other.get('/api/homework-exercises')
    expect(list.body.rows.map((e: { id: string }) => e.id)).not.toContain(created.body.id)
    expect(await count('audit_log', "action like 'homework-exercise.%' and entity_id = ?", [created.body.id])).toBe(3)
  })

  it('refuses an exercise without instructions with a field error', async () => {
    const res = await trainer.post('/api/homework-exercises', { title: 'No text', instructions: '  ', expectedVideos: 1 })
    expect(res.status).toBe(422)
    expect(res.body.data.fieldErrors.instructions).toBe('Write what the handler should do.')
    expect(await count('homework_exercises', "title = 'No text'")).toBe(0)
  })
})

describe('assignments', () => {
  it('sets homework from an exercise (copying its text), e-mails the household and audits it', async () => {
    const res = await trainer.post(`/api/clients/${CLIENT_A}/homework`, { exerciseId: KITCHEN, dueDay: inDays(7), milestoneId: DISCRIMINATION_A })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    expect(res.body).toMatchObject({ title: 'Alert proofing in the kitchen while someone cooks', expectedVideos: 2, state: 'open', milestoneId: DISCRIMINATION_A, dogId: seedId('dog:fairweather') })
    const mail = await waitForMail(mailUrl, HANDLER_A, 'New homework')
    expect(mail.text).toContain('Alert proofing in the kitchen')
    expect(linkIn(mail.text, `/handler/homework/assignments/${res.body.id}`)).toBeTruthy()
    expect(await count('audit_log', "action = 'homework.assigned' and entity_id = ?", [res.body.id])).toBe(1)
    const handler = await signIn(baseUrl, HANDLER_A)
    const list = await handler.get(`/api/clients/${CLIENT_A}/homework`)
    const row = list.body.rows.find((r: { id: string }) => r.id === res.body.id)
    expect(row.due.label).toBe('Due in 7 days')
  })

  it('sets homework from scratch; the exercise text is not needed then, a title is', async () => {
    const missing = await trainer.post(`/api/clients/${CLIENT_A}/homework`, { dueDay: inDays(3), title: '', instructions: 'Do it.' })
    expect(missing.status).toBe(422)
    expect(missing.body.data.fieldErrors.title).toMatch(/title/)
    const ok = await trainer.post(`/api/clients/${CLIENT_A}/homework`, { dueDay: inDays(3), title: 'Garden search', instructions: 'One target under a pot.', expectedVideos: 1 })
    expect(ok.status).toBe(201)
    expect(ok.body.exerciseId).toBeNull()
  })

  it('refuses a due date in the past, another client\'s milestone and an unknown exercise, and writes nothing', async () => {
    const before = await count('homework_assignments')
    const past = await trainer.post(`/api/clients/${CLIENT_A}/homework`, { exerciseId: KITCHEN, dueDay: inDays(-3) })
    expect(past.status).toBe(422)
    expect(past.body.data.fieldErrors.dueDay).toMatch(/cannot be in the past/)
    const foreign = await trainer.post(`/api/clients/${CLIENT_A}/homework`, { exerciseId: KITCHEN, dueDay: inDays(3), milestoneId: MILESTONE_B })
    expect(foreign.status).toBe(422)
    expect(foreign.body.data.fieldErrors.milestoneId).toBe('Choose one of this client\'s milestones.')
    const unknown = await trainer.post(`/api/clients/${CLIENT_A}/homework`, { exerciseId: 'no-such-exercise', dueDay: inDays(3) })
    expect(unknown.status).toBe(422)
    expect(unknown.body.data.fieldErrors.exerciseId).toMatch(/library/)
    const badDate = await trainer.post(`/api/clients/${CLIENT_A}/homework`, { exerciseId: KITCHEN, dueDay: '2026-02-30' })
    expect(badDate.status).toBe(422)
    expect(await count('homework_assignments')).toBe(before)
    expect(await count('outbox', "subject like 'New homework%'")).toBe(0)
  })

  it('keeps another trainer\'s client out of reach (404) and the handler out of setting homework (403)', async () => {
    const other = await signIn(baseUrl, TRAINER_B)
    expect((await other.post(`/api/clients/${CLIENT_A}/homework`, { exerciseId: KITCHEN, dueDay: inDays(3) })).status).toBe(404)
    expect((await other.patch(`/api/homework-assignments/${OPEN}`, { title: 'x' })).status).toBe(404)
    const handler = await signIn(baseUrl, HANDLER_A)
    expect((await handler.post(`/api/clients/${CLIENT_A}/homework`, { exerciseId: KITCHEN, dueDay: inDays(3) })).status).toBe(403)
    expect((await handler.get(`/api/clients/${CLIENT_B}/homework`)).status).toBe(404)
  })

  it('changes open homework, refuses moving it into the past, cancels it, then refuses changes', async () => {
    const changed = await trainer.patch(`/api/homework-assignments/${OPEN}`, { title: 'Two controls, one target, on the rug', expectedVideos: 2 })
    expect(changed.status, JSON.stringify(changed.body)).toBe(200)
    expect(changed.body).toMatchObject({ title: 'Two controls, one target, on the rug', expectedVideos: 2, state: 'open' })
    const past = await trainer.patch(`/api/homework-assignments/${OPEN}`, { dueDay: inDays(-1) })
    expect(past.status).toBe(422)
    expect(past.body.data.fieldErrors.dueDay).toBeTruthy()
    const foreign = await trainer.patch(`/api/homework-assignments/${OPEN}`, { milestoneId: MILESTONE_B })
    expect(foreign.status).toBe(422)
    const cancelled = await trainer.post(`/api/homework-assignments/${OPEN}/cancel`, { reason: 'Visit moved.' })
    expect(cancelled.body.state).toBe('cancelled')
    expect((await trainer.patch(`/api/homework-assignments/${OPEN}`, { title: 'Late change' })).status).toBe(409)
    expect((await trainer.post(`/api/homework-assignments/${OPEN}/cancel`, {})).status).toBe(409)
    const audit = await query("select action, data from audit_log where entity_id = ? order by id", [OPEN])
    expect(audit.map(a => a.action)).toEqual(['homework.updated', 'homework.cancelled'])
    expect(JSON.parse(String(audit[0]!.data)).before.title).toBe('Two controls and one target on the floor')
  })

  it('marks homework done when fewer videos are expected than are already approved', async () => {
    await query('update homework_assignments set state = ? where id = ?', ['open', DONE])
    await query('update homework_assignments set expected_videos = 2 where id = ?', [DONE])
    const res = await trainer.patch(`/api/homework-assignments/${DONE}`, { expectedVideos: 1 })
    expect(res.body.state).toBe('done')
  })
})

describe('the review queue', () => {
  it('shows the trainer\'s waiting videos oldest first, and filters by state, outcome and household', async () => {
    // A second waiting video for client A, older than the seeded one.
    const older = new Date(Date.now() - 5 * 86_400_000).getTime()
    await query(`insert into homework_videos (id, assignment_id, client_id, file_name, content_type, size, storage_key, duration_seconds, created_at, updated_at)
      values ('older-video', ?, ?, 'old.mp4', 'video/mp4', 10, 'homework-videos/x/old.mp4', 3, ?, ?)`, [OPEN, CLIENT_A, older, older])
    const waiting = await trainer.get('/api/homework-videos')
    expect(waiting.body.rows.map((r: { id: string }) => r.id)).toEqual(['older-video', WAITING])
    expect(waiting.body.rows.map((r: { state: string }) => r.state)).toEqual(['overdue', 'awaiting'])
    expect(waiting.body.rows[1]).toMatchObject({ householdName: 'Fairweather household', dogName: 'Juniper', assignmentTitle: 'Two controls and one target on the floor', uploadedByName: 'Ada Fairweather' })
    expect((await trainer.get('/api/homework-videos?state=overdue')).body.rows.map((r: { id: string }) => r.id)).toEqual(['older-video'])
    const approved = await trainer.get('/api/homework-videos?state=reviewed&outcome=approved')
    expect(approved.body.rows.map((r: { id: string }) => r.id)).toEqual([APPROVED])
    expect(approved.body.rows[0].commentCount).toBe(2)
    expect((await trainer.get('/api/homework-videos?state=all&outcome=try_again')).body.total).toBe(0)
    expect((await trainer.get(`/api/homework-videos?state=all&clientId=${CLIENT_B}`)).body.total).toBe(0)
    expect((await trainer.get('/api/homework-videos?state=soon')).status).toBe(400)
  })

  it('fills the roster\'s "Homework to review" column', async () => {
    const roster = await trainer.get('/api/clients?pageSize=50')
    const a = roster.body.rows.find((r: { id: string }) => r.id === CLIENT_A)
    expect(a.extras.homework.toReview).toBe(1)
    const lindgren = roster.body.rows.find((r: { id: string }) => r.id === seedId('client:lindgren'))
    expect(lindgren.extras.homework).toBeUndefined()
  })
})

describe('timed comments', () => {
  it('pins a comment inside the video and lists comments in time order for the household', async () => {
    expect((await trainer.post(`/api/homework-videos/${WAITING}/comments`, { atSeconds: 2.4, body: 'Reward here.' })).status).toBe(201)
    expect((await trainer.post(`/api/homework-videos/${WAITING}/comments`, { atSeconds: 0.5, body: 'Good start.' })).status).toBe(201)
    const handler = await signIn(baseUrl, HANDLER_A)
    const detail = await handler.get(`/api/homework-videos/${WAITING}`)
    expect(detail.body.video.comments.map((c: { body: string }) => c.body)).toEqual(['Good start.', 'Reward here.'])
    expect(detail.body.video.fileUrl).toBe(`/api/homework-videos/${WAITING}/file`)
    expect(detail.body.canReview).toBe(false)
    expect((await handler.post(`/api/homework-videos/${WAITING}/comments`, { atSeconds: 1, body: 'Me too' })).status).toBe(403)
  })

  it('refuses a comment past the video\'s end or before its start, and writes nothing', async () => {
    const past = await trainer.post(`/api/homework-videos/${WAITING}/comments`, { atSeconds: 10, body: 'Too late' })
    expect(past.status).toBe(422)
    // The seeded sample is 3 s long (tests/fixtures/README.md).
    expect(past.body.data.fieldErrors.atSeconds).toBe('The video is only 0:03 long: pin the comment at 0:03 or earlier.')
    const negative = await trainer.post(`/api/homework-videos/${WAITING}/comments`, { atSeconds: -1, body: 'Too early' })
    expect(negative.status).toBe(422)
    const empty = await trainer.post(`/api/homework-videos/${WAITING}/comments`, { atSeconds: 1, body: '' })
    expect(empty.status).toBe(422)
    expect(await count('homework_comments', 'video_id = ?', [WAITING])).toBe(0)
    expect(await count('audit_log', "action = 'homework-comment.added'")).toBe(0)
  })

  it('with the video\'s length unknown, refuses only a negative moment', async () => {
    await query('update homework_videos set duration_seconds = null where id = ?', [WAITING])
    expect((await trainer.post(`/api/homework-videos/${WAITING}/comments`, { atSeconds: 600, body: 'Late but allowed' })).status).toBe(201)
    expect((await trainer.post(`/api/homework-videos/${WAITING}/comments`, { atSeconds: -0.5, body: 'Never' })).status).toBe(422)
  })

  it('removes a comment and keeps what it said in the audit log', async () => {
    const comment = seedId('comment:fairweather:hold-alert:1:0')
    expect((await trainer.delete(`/api/homework-comments/${comment}`)).status).toBe(200)
    expect(await count('homework_comments', 'id = ?', [comment])).toBe(0)
    const [row] = await query("select data from audit_log where action = 'homework-comment.deleted' and entity_id = ?", [comment])
    expect(JSON.parse(String(row!.data)).body).toMatch(/clear nose touch/)
    expect((await (await signIn(baseUrl, TRAINER_B)).delete(`/api/homework-comments/${seedId('comment:fairweather:hold-alert:1:1')}`)).status).toBe(404)
  })
})

describe('the review', () => {
  it('approves a video, completes the homework, sets the next one and e-mails the household a summary with a link', async () => {
    await trainer.post(`/api/homework-videos/${WAITING}/comments`, { atSeconds: 2, body: 'Nice clear nose touch on the target tin.' })
    const res = await trainer.post(`/api/homework-videos/${WAITING}/review`, { outcome: 'approved', notes: 'Well set up.', next: { exerciseId: BLIND, dueDay: inDays(10) } })
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect(res.body.completed).toBe(true)
    expect(res.body.next).toMatchObject({ title: 'Blind line-up set by a helper', clientId: CLIENT_A, state: 'open' })
    expect(res.body.video).toMatchObject({ reviewOutcome: 'approved', reviewNotes: 'Well set up.', nextAssignmentId: res.body.next.id })
    expect((await query('select state from homework_assignments where id = ?', [OPEN]))[0]!.state).toBe('done')

    const mail = await waitForMail(mailUrl, HANDLER_A, 'Homework approved')
    expect(mail.text).toContain('approved it')
    expect(mail.text).toContain('Your trainer\'s notes: Well set up.')
    expect(mail.text).toContain('at 0:02: Nice clear nose touch on the target tin.')
    expect(mail.text).toContain('This homework is now complete.')
    expect(mail.text).toContain('Your next homework: "Blind line-up set by a helper"')
    expect(mail.text).toContain('never replaces it')
    expect(linkIn(mail.text, `/handler/homework/videos/${WAITING}`)).toBeTruthy()
    // The next homework is named in the review e-mail: no second "New homework" e-mail.
    expect(await count('outbox', "subject like 'New homework%'")).toBe(0)
    const actions = (await query("select action from audit_log where action like 'homework%' order by id")).map(r => r.action)
    expect(actions).toEqual(['homework-comment.added', 'homework.assigned', 'homework.reviewed', 'homework.completed'])

    // The household sees the outcome and the comments; the queue no longer lists the video as waiting.
    const handler = await signIn(baseUrl, HANDLER_A)
    const seen = await handler.get(`/api/homework-videos/${WAITING}`)
    expect(seen.body.video.reviewOutcome).toBe('approved')
    expect(seen.body.next.title).toBe('Blind line-up set by a helper')
    expect((await trainer.get('/api/homework-videos')).body.total).toBe(0)
    expect((await trainer.post(`/api/homework-videos/${WAITING}/review`, { outcome: 'approved' })).status).toBe(409)
  })

  it('asks for notes with "try again", keeps the homework open, and says so in the e-mail', async () => {
    const noNotes = await trainer.post(`/api/homework-videos/${WAITING}/review`, { outcome: 'try_again' })
    expect(noNotes.status).toBe(422)
    expect(noNotes.body.data.fieldErrors.notes).toMatch(/what to change/)
    const res = await trainer.post(`/api/homework-videos/${WAITING}/review`, { outcome: 'try_again', notes: 'Move the tins further apart.' })
    expect(res.status).toBe(200)
    expect(res.body.completed).toBe(false)
    expect((await query('select state from homework_assignments where id = ?', [OPEN]))[0]!.state).toBe('open')
    const mail = await waitForMail(mailUrl, HANDLER_A, 'please try again')
    expect(mail.text).toContain('Move the tins further apart.')
    expect(mail.text).toContain('Film another go')
  })

  it('refuses a next homework due in the past and writes nothing at all', async () => {
    const res = await trainer.post(`/api/homework-videos/${WAITING}/review`, { outcome: 'approved', next: { exerciseId: BLIND, dueDay: inDays(-2) } })
    expect(res.status).toBe(422)
    expect(res.body.data.fieldErrors['next.dueDay']).toMatch(/past/)
    const next = await trainer.post(`/api/homework-videos/${WAITING}/review`, { outcome: 'approved', next: { dueDay: inDays(2) } })
    expect(next.status).toBe(422)
    expect(next.body.data.fieldErrors['next.title']).toBeTruthy()
    expect((await query('select reviewed_at from homework_videos where id = ?', [WAITING]))[0]!.reviewed_at).toBeNull()
    expect(await count('audit_log', "action like 'homework%'")).toBe(0)
    expect(await count('outbox', "subject like '%omework%'")).toBe(0)
  })

  it('keeps another trainer and the handler from reviewing', async () => {
    const other = await signIn(baseUrl, TRAINER_B)
    expect((await other.post(`/api/homework-videos/${WAITING}/review`, { outcome: 'approved' })).status).toBe(404)
    const handler = await signIn(baseUrl, HANDLER_A)
    expect((await handler.post(`/api/homework-videos/${WAITING}/review`, { outcome: 'approved' })).status).toBe(403)
    expect((await handler.get('/api/homework-videos')).status).toBe(403)
  })
})
