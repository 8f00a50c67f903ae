import { createClient as libsql } from '@libsql/client'
import { expect, test, type Page } from '@playwright/test'
import { CLIENT_A, HANDLER_A, TRAINER_A } from '../support/people'
import { resetDatabase } from '../support/stack'
import { outboxItems, PHONE, shot, signInAs, waitForWorker } from './helpers'

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

test('an alert tapped with no signal survives a reload with no signal and arrives once, with the time of the tap', async ({ page, context }) => {
  test.setTimeout(90_000)
  await page.setViewportSize(PHONE)
  await signInAs(page, HANDLER_A)
  await page.goto(`/handler/diary/${CLIENT_A}`)
  await waitForWorker(page)
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
  test.setTimeout(90_000)
  await page.setViewportSize(PHONE)
  await signInAs(page, TRAINER_A)
  await page.goto(`/trainer/clients/${CLIENT_A}/training`)
  await waitForWorker(page)
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
  const shown = await page.evaluate(async () => (await (await navigator.serviceWorker.ready).getNotifications()).map(n => n.title))
  expect(shown).toEqual([expect.stringMatching(/^Sample .+: 5 minutes out$/)])
  await shot(page, 'sample-out-alarm-phone')
  // (The page's clock now runs 5 minutes ahead of the server's, so the return is not recorded from this page.)
})
