import { createClient as libsql } from '@libsql/client'
import { beforeEach, describe, expect, inject, it } from 'vitest'
import { seedId } from '../../scripts/lib/seed-data'
import { inbox, signIn, waitForMail, type Agent } from '../support/http'
import { ADMIN, CLIENT_A, CLIENT_B, HANDLER_A, HANDLER_B, TRAINER_A, TRAINER_B } from '../support/people'
import { resetDatabase } from '../support/stack'

const baseUrl = inject('baseUrl')
const mailUrl = inject('mailUrl')
const databaseUrl = inject('databaseUrl')

// Nakashima: trainer A's household whose warned-of share dropped in the last month of the seeded diary.
const NAKASHIMA = seedId('client:nakashima')
const ACHTERBERG = CLIENT_B

// Times in a test are counted back from one instant, so the lead between two entries is exact.
let base = Date.now()
const minutesAgo = (n: number) => new Date(base - n * 60_000).toISOString()

async function query(sql: string, args: (string | number)[] = []) {
  const db = libsql({ url: databaseUrl })
  try {
    return (await db.execute({ sql, args })).rows
  }
  finally {
    db.close()
  }
}
const count = async (table: string, where = '1=1', args: (string | number)[] = []) => Number((await query(`select count(*) n from ${table} where ${where}`, args))[0]!.n)
const entries = (clientId: string) => count('diary_entries', 'client_id = ?', [clientId])

async function diary(agent: Agent, clientId = CLIENT_A) {
  const res = await agent.get(`/api/clients/${clientId}/diary`)
  expect(res.status, JSON.stringify(res.body)).toBe(200)
  return res.body
}
async function log(agent: Agent, body: Record<string, unknown>, clientId = CLIENT_A) {
  const res = await agent.post(`/api/clients/${clientId}/diary`, body)
  expect(res.status, JSON.stringify(res.body)).toBe(201)
  return res.body as { id: string, kind: string, occurredAt: string }
}

beforeEach(async () => {
  await resetDatabase(databaseUrl)
  base = Date.now()
})

describe('logging and reading the diary', () => {
  it('a handler logs an alert and, 90 minutes later, an episode: the episode is warned of and the summary counts it', async () => {
    const handler = await signIn(baseUrl, HANDLER_A)
    const before = await diary(handler)
    const { episodes, warnedEpisodes } = before.period.totals

    const a = await log(handler, { kind: 'alert', occurredAt: minutesAgo(100) })
    const e = await log(handler, { kind: 'episode', occurredAt: minutesAgo(10) })
    expect(a).toMatchObject({ kind: 'alert', clientId: CLIENT_A })

    const after = await diary(handler)
    expect(after.period.totals.episodes).toBe(episodes + 1)
    expect(after.period.totals.warnedEpisodes).toBe(warnedEpisodes + 1)
    expect(after.period.sentence).toMatch(new RegExp(`^The dog warned of ${warnedEpisodes + 1} of your last ${episodes + 1} migraines, on average about `))
    expect(after.period.sentence).not.toBe(before.period.sentence)
    // Newest first; the alert is marked true and the episode warned of, 90 min ahead (migraine window 0–240 min).
    expect(after.entries[0]).toMatchObject({ id: e.id, kind: 'episode', createdByName: 'Ada Fairweather', match: { warned: true, alertIds: [a.id], leadMinutes: 90 } })
    expect(after.entries[1]).toMatchObject({ id: a.id, kind: 'alert', match: { isTrue: true, outcome: 'warning', episodeId: e.id } })
    expect(after.window).toMatchObject({ minMinutes: 0, maxMinutes: 240, source: 'policy' })
  })

  it('an alert with no episode after it lowers the share of true alerts, and the entries are audited on the client', async () => {
    const handler = await signIn(baseUrl, HANDLER_A)
    const before = (await diary(handler)).period.totals
    const a = await log(handler, { kind: 'alert', occurredAt: minutesAgo(3), behaviour: 'Nudged my hand', confidence: 'sure' })
    const after = (await diary(handler)).period.totals
    expect(after.alerts).toBe(before.alerts + 1)
    expect(after.trueAlerts).toBe(before.trueAlerts)
    const audit = await query('select action, client_id, actor_id from audit_log where entity_id = ?', [a.id])
    expect(audit).toEqual([expect.objectContaining({ action: 'diary-alert.logged', client_id: CLIENT_A, actor_id: seedId('user:handler') })])
  })

  it('the trainer and the admin log on the household’s behalf; the entry names who logged it', async () => {
    const trainer = await signIn(baseUrl, TRAINER_A)
    const e = await log(trainer, { kind: 'episode', occurredAt: minutesAgo(60), severity: 'moderate', action: 'Took medication' })
    const d = await diary(await signIn(baseUrl, HANDLER_A))
    expect(d.entries.find((x: { id: string }) => x.id === e.id)).toMatchObject({ createdByName: 'Maren Holt', severity: 'moderate', action: 'Took medication' })
  })

  it('editing adds details and moves the time, each change audited with before and after; deleting is audited too', async () => {
    const handler = await signIn(baseUrl, HANDLER_A)
    const a = await log(handler, { kind: 'alert', occurredAt: minutesAgo(5) })
    const moved = minutesAgo(20)
    const res = await handler.patch(`/api/diary-entries/${a.id}`, { occurredAt: moved, place: 'Kitchen', confidence: 'fairly-sure' })
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect(res.body).toMatchObject({ place: 'Kitchen', confidence: 'fairly-sure', occurredAt: new Date(moved).toISOString() })
    const del = await handler.delete(`/api/diary-entries/${a.id}`)
    expect(del.status).toBe(200)
    expect(await count('diary_entries', 'id = ?', [a.id])).toBe(0)
    const audit = await query('select action, data from audit_log where entity_id = ? order by id', [a.id])
    expect(audit.map(r => r.action)).toEqual(['diary-alert.logged', 'diary-alert.edited', 'diary-alert.deleted'])
    const edited = JSON.parse(String(audit[1]!.data))
    expect(edited.fields.sort()).toEqual(['confidence', 'occurredAt', 'place'])
    expect(edited.before).toMatchObject({ place: null, confidence: null })
    expect(edited.after).toMatchObject({ place: 'Kitchen', confidence: 'fairly-sure', occurredAt: new Date(moved).toISOString() })
  })

  it('shows a minimum-evidence note for a short diary (Achterberg: a few weeks in)', async () => {
    const d = await diary(await signIn(baseUrl, HANDLER_B), ACHTERBERG)
    expect(d.period.enoughEvidence).toBe(false)
    expect(d.period.totals.episodes).toBeLessThan(10)
    expect(d.period.sentence).toMatch(/at least 10 are needed before these figures say much/)
    expect(d.refresher).toBeNull() // the household does not see the trainer's follow-up figures
  })
})

describe('bad input: a clear 4xx and nothing written', () => {
  it('refuses an episode or an alert in the future', async () => {
    const handler = await signIn(baseUrl, HANDLER_A)
    const n = await entries(CLIENT_A)
    for (const kind of ['episode', 'alert']) {
      const res = await handler.post(`/api/clients/${CLIENT_A}/diary`, { kind, occurredAt: new Date(Date.now() + 3_600_000).toISOString() })
      expect(res.status).toBe(422)
      expect(res.body.data.fieldErrors.occurredAt).toMatch(kind === 'episode' ? /An episode cannot start in the future/ : /An alert cannot be in the future/)
    }
    expect(await entries(CLIENT_A)).toBe(n)
  })

  it('refuses malformed times, times without an offset, impossible dates and unknown fields', async () => {
    const handler = await signIn(baseUrl, HANDLER_A)
    const n = await entries(CLIENT_A)
    for (const occurredAt of ['yesterday', '2026-05-04T09:30', '2026-02-30T09:30:00Z', 1_700_000_000_000, null]) {
      const res = await handler.post(`/api/clients/${CLIENT_A}/diary`, { kind: 'alert', occurredAt })
      expect(res.status, String(occurredAt)).toBe(422)
      expect(res.body.data.fieldErrors.occurredAt).toBeTruthy()
    }
    expect((await handler.post(`/api/clients/${CLIENT_A}/diary`, { kind: 'alarm', occurredAt: minutesAgo(1) })).body.data.fieldErrors.kind).toBe('Say whether this is an alert or an episode.')
    expect((await handler.post(`/api/clients/${CLIENT_A}/diary`, { kind: 'alert', occurredAt: minutesAgo(1), severity: 'mild' })).status).toBe(422)
    expect((await handler.post(`/api/clients/${CLIENT_A}/diary`, { kind: 'alert', occurredAt: minutesAgo(1), clientId: CLIENT_B })).status).toBe(422)
    const broken = await handler.request('POST', `/api/clients/${CLIENT_A}/diary`, '{"kind": "alert",')
    expect(broken.status).toBe(400)
    expect(await entries(CLIENT_A)).toBe(n)
  })

  it('answers 404 for another household, for handlers and trainers alike, and writes nothing', async () => {
    const nA = await entries(CLIENT_A)
    const nB = await entries(CLIENT_B)
    for (const who of [HANDLER_A, TRAINER_A]) {
      const res = await (await signIn(baseUrl, who)).post(`/api/clients/${CLIENT_B}/diary`, { kind: 'alert', occurredAt: minutesAgo(1) })
      expect(res.status).toBe(404)
    }
    const [theirs] = await query('select id from diary_entries where client_id = ? limit 1', [CLIENT_B])
    const handlerA = await signIn(baseUrl, HANDLER_A)
    expect((await handlerA.patch(`/api/diary-entries/${theirs!.id}`, { notes: 'not mine' })).status).toBe(404)
    expect((await handlerA.delete(`/api/diary-entries/${theirs!.id}`)).status).toBe(404)
    expect((await (await signIn(baseUrl, TRAINER_B)).get(`/api/clients/${CLIENT_A}/diary`)).status).toBe(404)
    expect(await entries(CLIENT_A)).toBe(nA)
    expect(await entries(CLIENT_B)).toBe(nB)
    expect(await count('diary_entries', 'id = ? and notes is null', [String(theirs!.id)])).toBe(1)
  })

  it('refuses to move an entry into the future or change its kind, leaving it as it was', async () => {
    const handler = await signIn(baseUrl, HANDLER_A)
    const a = await log(handler, { kind: 'alert', occurredAt: minutesAgo(5) })
    expect((await handler.patch(`/api/diary-entries/${a.id}`, { occurredAt: new Date(Date.now() + 86_400_000).toISOString() })).status).toBe(422)
    expect((await handler.patch(`/api/diary-entries/${a.id}`, { kind: 'episode' })).status).toBe(422)
    expect((await handler.patch(`/api/diary-entries/${a.id}`, { severity: 'mild' })).status).toBe(422)
    expect((await handler.patch(`/api/diary-entries/${a.id}`, {})).status).toBe(422)
    const [row] = await query('select kind, occurred_at, severity from diary_entries where id = ?', [a.id])
    expect(row).toMatchObject({ kind: 'alert', occurred_at: new Date(a.occurredAt).getTime(), severity: null })
    expect(await count('audit_log', 'entity_id = ? and action like ?', [a.id, '%edited'])).toBe(0)
  })

  it('refuses a window with min over max, or not in whole minutes, and stores nothing', async () => {
    const trainer = await signIn(baseUrl, TRAINER_A)
    for (const body of [{ minMinutes: 120, maxMinutes: 60 }, { minMinutes: -5, maxMinutes: 60 }, { minMinutes: 0, maxMinutes: 2000 }, { minMinutes: '0', maxMinutes: 60 }, { minMinutes: 0 }]) {
      const res = await trainer.request('PUT', `/api/clients/${CLIENT_A}/diary-window`, body)
      expect(res.status, JSON.stringify(body)).toBe(422)
      expect(Object.keys(res.body.data.fieldErrors).length).toBeGreaterThan(0)
    }
    expect(await count('diary_windows')).toBe(0)
    expect(await count('audit_log', 'action like ?', ['diary-window%'])).toBe(0)
  })
})

describe('the client’s own window', () => {
  it('the trainer narrows the window and the matching follows; back to the policy restores it', async () => {
    const handler = await signIn(baseUrl, HANDLER_A)
    const trainer = await signIn(baseUrl, TRAINER_A)
    await log(handler, { kind: 'alert', occurredAt: minutesAgo(100) })
    const e = await log(handler, { kind: 'episode', occurredAt: minutesAgo(10) })
    const lead = (d: { entries: { id: string, match: { warned: boolean, leadMinutes: number | null } }[] }) => d.entries.find(x => x.id === e.id)!.match

    const set = await trainer.request('PUT', `/api/clients/${CLIENT_A}/diary-window`, { minMinutes: 0, maxMinutes: 60 })
    expect(set.status, JSON.stringify(set.body)).toBe(200)
    expect(set.body).toEqual({ clientId: CLIENT_A, minMinutes: 0, maxMinutes: 60, source: 'client' })
    const narrow = await diary(handler)
    expect(narrow.window).toMatchObject({ minMinutes: 0, maxMinutes: 60, source: 'client' })
    expect(lead(narrow)).toMatchObject({ warned: false, leadMinutes: null }) // 90 min is outside 0–60

    expect((await handler.request('PUT', `/api/clients/${CLIENT_A}/diary-window`, { minMinutes: 0, maxMinutes: 300 })).status).toBe(403)
    const cleared = await trainer.delete(`/api/clients/${CLIENT_A}/diary-window`)
    expect(cleared.status).toBe(200)
    expect(cleared.body).toMatchObject({ minMinutes: 0, maxMinutes: 240, source: 'policy' })
    expect(lead(await diary(handler))).toMatchObject({ warned: true, leadMinutes: 90 })
    expect((await trainer.delete(`/api/clients/${CLIENT_A}/diary-window`)).status).toBe(404)
    expect((await query('select action from audit_log where action like ? order by id', ['diary-window%'])).map(r => r.action)).toEqual(['diary-window.set', 'diary-window.cleared'])
  })
})

describe('the business policy', () => {
  it('the admin changes the migraine window on /admin/settings and every migraine diary without its own window follows', async () => {
    const admin = await signIn(baseUrl, ADMIN)
    const policy = (await admin.get('/api/settings/diary')).body.value
    expect(policy).toMatchObject({ summaryDays: 90, recentDays: 30, minRecentEpisodes: 5, refresherBelowPercent: 60, migraine: { minMinutes: 0, maxMinutes: 240 } })
    try {
      const bad = await admin.request('PUT', '/api/settings/diary', { ...policy, migraine: { minMinutes: 200, maxMinutes: 100 } })
      expect(bad.status).toBe(422)
      expect(bad.body.data.fieldErrors['migraine.minMinutes']).toMatch(/must not be more than/)
      const ok = await admin.request('PUT', '/api/settings/diary', { ...policy, migraine: { minMinutes: 0, maxMinutes: 120 } })
      expect(ok.status, JSON.stringify(ok.body)).toBe(200)
      const d = await diary(await signIn(baseUrl, HANDLER_A))
      expect(d.window).toMatchObject({ minMinutes: 0, maxMinutes: 120, source: 'policy' })
    }
    finally {
      // Business settings outlive the reseed: remove the stored policy so the defaults apply again.
      await query('delete from business_settings where key = ?', ['diary'])
    }
  })
})

describe('reviews', () => {
  it('the trainer marks an alert as reviewed with a comment; the handler may not; an episode is not reviewed', async () => {
    const handler = await signIn(baseUrl, HANDLER_A)
    const trainer = await signIn(baseUrl, TRAINER_A)
    const a = await log(handler, { kind: 'alert', occurredAt: minutesAgo(30) })
    const e = await log(handler, { kind: 'episode', occurredAt: minutesAgo(5) })
    expect((await handler.post(`/api/diary-entries/${a.id}/review`, { comment: 'Looks right' })).status).toBe(403)
    expect((await trainer.post(`/api/diary-entries/${a.id}/review`, { comment: '  ' })).status).toBe(422)
    const res = await trainer.post(`/api/diary-entries/${a.id}/review`, { comment: 'Clear nudge, well rewarded.' })
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect(res.body).toMatchObject({ reviewComment: 'Clear nudge, well rewarded.', reviewedById: seedId('user:trainer') })
    expect((await trainer.post(`/api/diary-entries/${e.id}/review`, { comment: 'x' })).status).toBe(409)
    const seen = (await diary(handler)).entries.find((x: { id: string }) => x.id === a.id)
    expect(seen).toMatchObject({ reviewComment: 'Clear nudge, well rewarded.', reviewedByName: 'Maren Holt' })
    expect(await count('audit_log', 'entity_id = ? and action = ?', [a.id, 'diary-alert.reviewed'])).toBe(1)
  })
})

describe('refresher follow-up', () => {
  const subject = 'Refresher suggested: Nakashima household'

  it('the seeded Nakashima diary shows the drop to the trainer; the next change e-mails the trainer once', async () => {
    const trainer = await signIn(baseUrl, TRAINER_A)
    const d = await diary(trainer, NAKASHIMA)
    expect(d.refresher).toMatchObject({ due: true })
    expect(d.refresher.recentEpisodes).toBeGreaterThanOrEqual(5)
    expect(d.refresher.recentWarned / d.refresher.recentEpisodes).toBeLessThan(0.6) // policy default 60% (common practice)
    expect(d.refresher.earlierShare).toBeGreaterThan(0.6)
    expect(await count('outbox', 'subject = ?', [subject])).toBe(0) // the seed itself sends nothing
    const mailsBefore = (await inbox(mailUrl, TRAINER_A)).filter(m => m.subject === subject).length

    await log(trainer, { kind: 'episode', occurredAt: minutesAgo(20) }, NAKASHIMA)
    await log(await signIn(baseUrl, 'mei.nakashima@example.test'), { kind: 'episode', occurredAt: minutesAgo(10) }, NAKASHIMA)
    const rows = await query('select to_address, dedupe_key, text_body from outbox where subject = ?', [subject])
    expect(rows).toHaveLength(1)
    expect(rows[0]).toMatchObject({ to_address: TRAINER_A })
    expect(String(rows[0]!.dedupe_key)).toMatch(new RegExp(`^diary-refresher:${NAKASHIMA}:\\d+$`))
    expect(String(rows[0]!.text_body)).toMatch(/schedule a refresher/)
    expect(String(rows[0]!.text_body)).toMatch(/never replaces it/)

    const mail = await waitForMail(mailUrl, TRAINER_A, subject)
    expect(mail.text).toContain(`/trainer/clients/${NAKASHIMA}/diary`)
    await new Promise(r => setTimeout(r, 500))
    expect((await inbox(mailUrl, TRAINER_A)).filter(m => m.subject === subject).length).toBe(mailsBefore + 1)
  })

  it('a household whose dog keeps warning is not flagged and no e-mail is written', async () => {
    const handler = await signIn(baseUrl, HANDLER_A)
    const d = await diary(await signIn(baseUrl, TRAINER_A))
    expect(d.refresher.due).toBe(false)
    await log(handler, { kind: 'alert', occurredAt: minutesAgo(50) })
    await log(handler, { kind: 'episode', occurredAt: minutesAgo(5) })
    expect(await count('outbox', 'dedupe_key like ?', ['diary-refresher:%'])).toBe(0)
  })
})

describe('roster column', () => {
  it('gives each client on the page the diary figures of the last 90 days; clients without a diary have none', async () => {
    const trainer = await signIn(baseUrl, TRAINER_A)
    const res = await trainer.get('/api/clients?pageSize=50')
    expect(res.status).toBe(200)
    const byId = new Map((res.body.rows as { id: string, extras: Record<string, any> }[]).map(r => [r.id, r.extras]))
    const fair = (await diary(trainer)).period.totals
    expect(byId.get(CLIENT_A)!.diary).toMatchObject({ episodes: fair.episodes, warned: fair.warnedEpisodes, alerts: fair.alerts, trueAlerts: fair.trueAlerts, days: 90, enoughEvidence: true })
    expect(byId.get(CLIENT_A)!.diary.medianLeadMinutes).toBeCloseTo(fair.leadMinutes.median, 6)
    expect(byId.get(seedId('client:moreau'))!.diary).toBeUndefined()
  })

  it('the admin sees every household’s figures, including the one with few entries', async () => {
    const res = await (await signIn(baseUrl, ADMIN)).get('/api/clients?pageSize=50')
    const row = (res.body.rows as { id: string, extras: Record<string, any> }[]).find(r => r.id === ACHTERBERG)!
    expect(row.extras.diary).toMatchObject({ enoughEvidence: false })
  })
})
