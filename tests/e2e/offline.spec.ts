import { createClient as libsql } from '@libsql/client'
import { expect, request as playwrightRequest, test, type Page } from '@playwright/test'
import { CLIENT_A, HANDLER_A, TRAINER_A } from '../support/people'
import { DEMO_PASSWORD, seedId } from '../../scripts/lib/seed-data'
import { resetDatabase } from '../support/stack'
import { outboxItems, PHONE, readIndexedDb, shot, signInAs, waitForWorker } from './helpers'

// No signal in a field, a barn or a basement: records made on the phone wait on it and arrive once, with the time
// of the tap, when the signal is back. The browser context is set offline (Playwright's setOffline).
test.use({ serviceWorkers: 'allow' })
test.beforeEach(async () => { await resetDatabase(process.env.E2E_DATABASE_URL!) })
test.afterAll(async () => { await resetDatabase(process.env.E2E_DATABASE_URL!) })

async function query(sql: string, args: (string | number)[] = []) {
  const db = libsql({ url: process.env.E2E_DATABASE_URL! })
  try { return (await db.execute({ sql, args })).rows }
  finally { db.close() }
}
const status = (page: Page) => page.getByTestId('outbox-status')

/** Signs in on a phone-sized page and opens `path` with a signal, once the service worker controls it. */
async function openOnPhone(page: Page, email: string, path: string) {
  test.setTimeout(90_000)
  await page.setViewportSize(PHONE)
  await signInAs(page, email)
  await page.goto(path)
  await waitForWorker(page)
}

test('an alert tapped with no signal survives a reload with no signal and arrives once, with the time of the tap', async ({ page, context }) => {
  await openOnPhone(page, HANDLER_A, `/handler/diary/${CLIENT_A}`)
  await expect(page.getByTestId('diary-title')).toBeVisible()
  const before = Number((await query('select count(*) n from diary_entries where client_id = ? and kind = ?', [CLIENT_A, 'alert']))[0]!.n)

  await context.setOffline(true)
  await page.getByRole('button', { name: 'Juniper alerted' }).click()
  await expect(page.getByTestId('diary-just-logged')).toContainText('Alert kept on this phone at')
  await expect(status(page)).toContainText('1 record waiting to send')
  await expect(status(page)).toContainText('no connection')
  const [waiting] = await outboxItems(page)
  expect(waiting).toMatchObject({ label: expect.stringMatching(/^Alert at \d\d:\d\d$/) })
  await shot(page, 'offline-diary-phone')

  // The page reloaded with no signal: the kept screen opens, the alert still waits.
  await page.reload()
  await expect(page.getByTestId('diary-quick-log')).toBeVisible()
  await expect(status(page)).toContainText('1 record waiting to send')
  await shot(page, 'offline-diary-reloaded-phone')

  // The signal is back: sent once, with the tapped time.
  await context.setOffline(false)
  await expect(status(page)).toBeHidden({ timeout: 20_000 })
  const rows = await query('select occurred_at from diary_entries where client_id = ? and kind = ? order by created_at desc', [CLIENT_A, 'alert'])
  expect(rows.length).toBe(before + 1)
  expect(Number(rows[0]!.occurred_at)).toBe(Date.parse(waiting!.tappedAt))
  const keys = await query('select tapped_at, received_at from request_keys where key = ?', [waiting!.key])
  expect(Number(keys[0]!.tapped_at)).toBe(Date.parse(waiting!.tappedAt))
  expect(Number(keys[0]!.received_at)).toBeGreaterThan(Number(keys[0]!.tapped_at))
})

test('a trainer starts, logs and finishes a session with no signal, and it arrives whole', async ({ page, context }) => {
  await openOnPhone(page, TRAINER_A, `/trainer/clients/${CLIENT_A}/training`)
  await expect(page.getByTestId('start-session')).toBeVisible()
  const sessionsBefore = Number((await query('select count(*) n from training_sessions where client_id = ?', [CLIENT_A]))[0]!.n)

  await context.setOffline(true)
  await page.getByTestId('session-place').fill('Barn with no signal')
  await page.getByTestId('session-blind').check()
  await page.getByTestId('start-session').click()
  await page.getByTestId('target-1').click()
  await page.getByTestId('indicated-1').click()
  await page.getByTestId('indicated-2').click()
  await page.getByTestId('target-blank').click()
  await page.getByTestId('indicated-none').click()
  await expect(page.getByTestId('pad-summary')).toContainText('3 trials · 1 hit')
  await expect(page.getByTestId('pad-trials').getByText('waiting to send')).toHaveCount(3)
  await expect(status(page)).toContainText('4 records waiting to send')
  await shot(page, 'offline-training-phone')
  // Reloaded with no signal: the session comes back from the phone.
  await page.reload()
  await expect(page.getByTestId('pad-summary')).toContainText('3 trials · 1 hit')
  await page.getByTestId('finish-session').click()
  await expect(status(page)).toContainText('4 records waiting to send')

  await context.setOffline(false)
  await expect(status(page)).toBeHidden({ timeout: 20_000 })
  const sessions = await query('select id, place, blind from training_sessions where client_id = ? order by created_at desc', [CLIENT_A])
  expect(sessions.length).toBe(sessionsBefore + 1)
  expect(sessions[0]).toMatchObject({ place: 'Barn with no signal', blind: 1 })
  const trials = await query('select target_station, indicated_station from training_trials where session_id = ? order by created_at', [String(sessions[0]!.id)])
  expect(trials.map(t => [t.target_station, t.indicated_station])).toEqual([[1, 1], [1, 2], [null, null]])
})

/** This phone's bag-code state (IndexedDB "forescent-device", composables/useBagCodes.ts). */
const deviceCodes = (page: Page) => readIndexedDb<{ prefix: string, reserved: boolean, next: number } | undefined>(page, 'forescent-device', 'settings', 'bag-codes')

test('a quick target sample saved with no signal gets its bag code at once and is stored once with that code', async ({ page, context }) => {
  await openOnPhone(page, HANDLER_A, `/handler/samples/${CLIENT_A}`)
  await expect(page.getByTestId('collect-button')).toBeVisible()
  await page.goto(`/handler/samples/${CLIENT_A}/collect`)
  // With a signal, the phone reserved its own bag-code prefix (shared/utils/bag-codes.ts).
  await expect.poll(async () => (await deviceCodes(page))?.reserved ?? false).toBe(true)
  const { prefix } = (await deviceCodes(page))!
  expect(await query('select count(*) n from bag_code_prefixes where prefix = ?', [prefix])).toEqual([expect.objectContaining({ n: 1 })])

  await context.setOffline(true)
  await page.getByRole('button', { name: /Target: an episode is starting/ }).click()
  await page.getByTestId('quick-save').click()
  await page.getByRole('button', { name: 'Just now' }).click()
  await page.getByTestId('next').click()
  await page.getByRole('button', { name: 'No medication yet' }).click()
  await page.getByTestId('next').click()
  await page.getByRole('button', { name: 'Save the sample' }).click()
  const code = (await page.getByTestId('bag-code').textContent())!.trim()
  expect(code).toMatch(new RegExp(`^T-${prefix}[A-Z2-9]{2}$`))
  await expect(page.getByTestId('sample-waiting')).toContainText('Kept on this phone')
  await expect(status(page)).toContainText('1 record waiting to send')
  const [waiting] = await outboxItems(page)
  expect(waiting!.label).toBe(`Target sample ${code}`)
  await shot(page, 'offline-sample-code-phone')

  // Reloaded with no signal, then the bank opened: the bag waits on the phone with its code.
  await page.reload()
  await expect(status(page)).toContainText('1 record waiting to send')
  await page.goto(`/handler/samples/${CLIENT_A}`)
  await expect(page.getByTestId('samples-on-phone')).toContainText(code)
  expect((await outboxItems(page)).map(i => i.key)).toEqual([waiting!.key])

  await context.setOffline(false)
  await expect(status(page)).toBeHidden({ timeout: 20_000 })
  const rows = await query('select kind, answers_completed_at, collected_at from samples where client_id = ? and bag_code = ?', [CLIENT_A, code])
  expect(rows).toHaveLength(1)
  expect(rows[0]).toMatchObject({ kind: 'target', answers_completed_at: null })
  const keys = await query('select tapped_at from request_keys where key = ?', [waiting!.key])
  expect(Number(keys[0]!.tapped_at)).toBe(Date.parse(waiting!.tappedAt))
  await expect(page.getByTestId('samples-on-phone')).toBeHidden()
  await expect(page.getByTestId('to-finish')).toContainText(code)
})

test('details added to an alert with no signal wait behind it and arrive once, the last edit winning', async ({ page, context }) => {
  await openOnPhone(page, HANDLER_A, `/handler/diary/${CLIENT_A}`)
  await expect(page.getByTestId('diary-title')).toBeVisible()
  await context.setOffline(true)
  await page.getByRole('button', { name: 'Juniper alerted' }).click()
  await expect(page.getByTestId('diary-just-logged')).toContainText('Alert kept on this phone at')
  await page.getByTestId('diary-add-details').click()
  await page.getByLabel('Where you were').fill('Car park')
  await page.getByRole('button', { name: 'Save the details' }).click()
  await expect(page.getByText('Details kept on this phone')).toBeVisible()
  await page.getByTestId('diary-add-details').click()
  await page.getByLabel('Where you were').fill('Car park by the station')
  await page.getByRole('button', { name: 'Save the details' }).click()
  await expect(status(page)).toContainText('3 records waiting to send')
  const created = (await outboxItems(page)).find(i => i.url.endsWith('/diary'))

  await context.setOffline(false)
  await expect(status(page)).toBeHidden({ timeout: 20_000 })
  const keys = await query('select response from request_keys where key = ?', [created!.key])
  const id = JSON.parse(String(keys[0]!.response)).id as string
  const rows = await query('select place, occurred_at from diary_entries where id = ?', [id])
  expect(rows).toEqual([expect.objectContaining({ place: 'Car park by the station', occurred_at: Date.parse(created!.tappedAt) })])
})

test('a sample taken out and put back with no signal, used up meanwhile on another phone: refused with the reason, and discarded', async ({ page, context, baseURL }) => {
  await openOnPhone(page, HANDLER_A, `/handler/samples/${CLIENT_A}`)
  const href = await page.getByTestId('ready-sample').first().getAttribute('href')
  const sampleId = href!.split('/').at(-1)!
  await page.goto(href!)
  await expect(page.getByTestId('take-out')).toBeVisible()
  const usesBefore = await query('select count(*) n from sample_uses where sample_id = ?', [sampleId])

  await context.setOffline(true)
  await page.getByTestId('take-out-button').click()
  await expect(page.getByTestId('open-use')).toContainText('Put it back within 5 minutes')
  await expect(page.getByTestId('use-on-phone')).toBeVisible()
  await page.getByRole('button', { name: 'It is back in the freezer' }).click()
  await expect(page.getByTestId('put-back-on-phone')).toBeVisible()
  await expect(status(page)).toContainText('2 records waiting to send')

  // Meanwhile, on the trainer's phone with a signal, the same bag is used until nothing is left of it.
  const other = await playwrightRequest.newContext({ baseURL, extraHTTPHeaders: { origin: baseURL! } })
  expect((await other.post('/api/auth/login', { data: { email: TRAINER_A, password: DEMO_PASSWORD } })).status()).toBe(200)
  for (let i = 0; i < 3; i++) {
    const outAt = new Date(Date.now() - (60 - i * 10) * 60_000)
    const res = await other.post(`/api/samples/${sampleId}/uses`, { data: { outAt: outAt.toISOString(), backAt: new Date(outAt.getTime() + 3 * 60_000).toISOString(), stage: 'discrimination' } })
    if (res.status() !== 201) break
  }
  await other.dispose()

  await context.setOffline(false)
  const refused = page.getByTestId('sample-record-refused')
  await expect(refused).toContainText('refused by the server', { timeout: 20_000 })
  await expect(refused).toContainText(/used|thrown away/i)
  await expect(status(page)).toContainText('1 refused by the server')
  await shot(page, 'offline-sample-use-refused-phone')
  page.once('dialog', d => d.accept()) // "1 record needs this one and will be discarded with it"
  await page.getByTestId('sample-record-discard').click()
  await expect(status(page)).toBeHidden()
  expect(await outboxItems(page)).toEqual([])
  const handlerUses = await query('select count(*) n from sample_uses u join users p on p.id = u.recorded_by_id where u.sample_id = ? and p.email = ?', [sampleId, HANDLER_A])
  expect(handlerUses).toEqual([expect.objectContaining({ n: 0 })])
  expect(Number((await query('select count(*) n from sample_uses where sample_id = ?', [sampleId]))[0]!.n)).toBeGreaterThan(Number(usesBefore[0]!.n))
})

test('a homework note written with no signal arrives once, with the time it was written', async ({ page, context }) => {
  const assignment = seedId('assignment:fairweather:two-controls')
  await openOnPhone(page, HANDLER_A, `/handler/homework/assignments/${assignment}`)
  await expect(page.getByTestId('homework-notes')).toBeVisible()
  await context.setOffline(true)
  await page.getByLabel('How did this practice go?').fill('Garden, 6 tries: 5 alerts, one miss by the shed.')
  await page.getByTestId('homework-note-save').click()
  await expect(page.getByText('Note kept on this phone')).toBeVisible()
  await expect(page.getByTestId('homework-note-on-phone')).toContainText('one miss by the shed')
  const [waiting] = await outboxItems(page)
  await page.reload()
  await expect(page.getByTestId('homework-note-on-phone')).toContainText('one miss by the shed')

  await context.setOffline(false)
  await expect(status(page)).toBeHidden({ timeout: 20_000 })
  await expect(page.getByTestId('homework-note')).toContainText('one miss by the shed')
  const rows = await query('select practised_at from homework_notes where assignment_id = ?', [assignment])
  expect(rows).toEqual([expect.objectContaining({ practised_at: Date.parse(waiting!.tappedAt) })])
})

test('trials an earlier version kept in localStorage move onto the outbox on start, and arrive once', async ({ page }) => {
  const [session] = await query('select id from training_sessions where client_id = ? order by created_at desc limit 1', [CLIENT_A])
  const entryKey = 'a1b2c3d4-e5f6-4a7b-8c9d-0e1f2a3b4c5d'
  const old = { queue: [{ entryKey, sessionId: String(session!.id), clientId: CLIENT_A, stations: 3, targetStation: 2, indicatedStation: 2, queuedAt: new Date().toISOString() }], open: {} }
  await page.addInitScript((value) => {
    if (sessionStorage.getItem('old-queue-set')) return
    localStorage.setItem('trial-queue', value)
    sessionStorage.setItem('old-queue-set', '1')
  }, JSON.stringify(old))
  await page.setViewportSize(PHONE)
  await signInAs(page, TRAINER_A)
  await expect.poll(async () => Number((await query('select count(*) n from training_trials where entry_key = ?', [entryKey]))[0]!.n), { timeout: 20_000 }).toBe(1)
  expect(await page.evaluate(() => localStorage.getItem('trial-queue'))).toBeNull()
  await page.reload()
  await expect(status(page)).toBeHidden()
  expect(Number((await query('select count(*) n from training_trials where entry_key = ?', [entryKey]))[0]!.n)).toBe(1)
})

test.describe('refusals', () => {
  // Playwright's request interception does not see requests through a service worker: this one runs without it.
  test.use({ serviceWorkers: 'block' })
  test('a record the server refuses is kept with its reason until the person discards it', async ({ page, context }) => {
    await page.setViewportSize(PHONE)
    await signInAs(page, HANDLER_A)
    await page.goto(`/handler/diary/${CLIENT_A}`)
    await expect(page.getByTestId('diary-title')).toBeVisible()
    await context.setOffline(true)
    await page.getByRole('button', { name: 'Juniper alerted' }).click()
    await expect(status(page)).toContainText('1 record waiting to send')
    // While it waited, a rule changed on the server: it refuses the record with a reason.
    await page.route('**/api/clients/*/diary', route => route.request().method() === 'POST'
      ? route.fulfill({ status: 422, contentType: 'application/json', body: JSON.stringify({ statusCode: 422, message: 'This household’s diary is closed.' }) })
      : route.continue())
    await context.setOffline(false)
    await expect(status(page)).toContainText('1 refused by the server', { timeout: 20_000 })
    await expect(page.getByTestId('outbox-item')).toContainText('Refused by the server: This household’s diary is closed.')
    await shot(page, 'offline-refused-phone')
    await page.getByTestId('outbox-discard').click()
    await expect(status(page)).toBeHidden()
    expect(await outboxItems(page)).toEqual([])
  })
})

test('the app is installable: its manifest, icons and a service worker controlling the page after a reload', async ({ page, request }) => {
  await page.goto('/login')
  const href = await page.locator('link[rel="manifest"]').first().getAttribute('href')
  expect(href).toBeTruthy()
  const manifest = await (await request.get(href!)).json()
  // The fields Chromium's installability check reads (W3C Web App Manifest; web.dev "installable" criteria, from memory).
  expect(manifest).toMatchObject({ name: 'Forescent', short_name: 'Forescent', start_url: '/', display: 'standalone', theme_color: '#1f4d45' })
  const sizes = (manifest.icons as { sizes: string, type: string }[]).filter(i => i.type === 'image/png').map(i => i.sizes)
  expect(sizes).toEqual(expect.arrayContaining(['192x192', '512x512']))
  for (const icon of manifest.icons as { src: string }[]) expect((await request.get(icon.src)).status()).toBe(200)
  await waitForWorker(page)
  expect(await page.evaluate(() => navigator.serviceWorker.controller?.scriptURL)).toMatch(/\/sw\.js$/)
})

test('a sample out of the freezer for 5 minutes rings: a notification through the service worker, and the alarm on screen', async ({ page, context }) => {
  test.setTimeout(90_000)
  await context.grantPermissions(['notifications'])
  await page.clock.install()
  await page.setViewportSize(PHONE)
  await signInAs(page, HANDLER_A)
  await page.goto(`/handler/samples/${CLIENT_A}`)
  await waitForWorker(page)
  await page.getByTestId('ready-sample').first().click()
  await page.getByTestId('take-out-button').click()
  await expect(page.getByTestId('open-use')).toContainText('The phone will buzz and show a notification')
  await expect(page.getByTestId('out-alarm')).toBeHidden()
  // The policy's limit is 5 minutes out per use (common practice).
  await page.clock.fastForward('05:01')
  await expect(page.getByTestId('out-alarm')).toContainText('5 minutes out: put it back in the freezer now.')
  // The notification is shown through the service worker a moment after the screen's alarm.
  await expect.poll(() => page.evaluate(async () => (await (await navigator.serviceWorker.ready).getNotifications()).map(n => n.title)), { timeout: 20_000 })
    .toEqual([expect.stringMatching(/^Sample .+: 5 minutes out$/)])
  await shot(page, 'sample-out-alarm-phone')
  // (The page's clock now runs 5 minutes ahead of the server's, so the return is not recorded from this page.)
})
