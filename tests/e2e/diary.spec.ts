import { expect, test, type Page } from '@playwright/test'
import { seedId } from '../../scripts/lib/seed-data'
import { HANDLER_A, TRAINER_A } from '../support/people'
import { resetDatabase } from '../support/stack'
import { DESKTOP, PHONE, shot as fullShot, signInAs } from './helpers'

/** The full page, and what the screen shows (the top of a long diary), when E2E_SCREENSHOTS is set. */
async function shot(page: Page, name: string) {
  await fullShot(page, name)
  if (process.env.E2E_SCREENSHOTS) await page.screenshot({ path: `${process.env.E2E_SCREENSHOTS}/${name}-screen.png` })
}

// These tests add diary entries: start from, and leave behind, the plain demo.
test.beforeEach(async () => { await resetDatabase(process.env.E2E_DATABASE_URL!) })
test.afterAll(async () => { await resetDatabase(process.env.E2E_DATABASE_URL!) })

const NAKASHIMA = seedId('client:nakashima')

/** "The dog warned of 15 of your last 19 migraines…" → [15, 19] */
function counts(sentence: string): [number, number] {
  const m = sentence.match(/warned of (\d+) of your last (\d+) migraines/)
  if (!m) throw new Error(`No counts in: ${sentence}`)
  return [Number(m[1]), Number(m[2])]
}

test('on a phone, the handler logs an alert, moves it an hour back, adds details, logs the episode, and the summary counts it', async ({ page }) => {
  await page.setViewportSize(PHONE)
  await signInAs(page, HANDLER_A)
  await page.getByTestId('handler-diary-button').click()
  await expect(page).toHaveURL(/\/handler\/diary\//)
  await expect(page.getByTestId('diary-title')).toHaveText('Alert diary')
  await expect(page.getByTestId('diary-caution')).toContainText('never replace it')
  const summary = page.getByTestId('diary-summary')
  const before = counts(await summary.innerText())
  await shot(page, 'diary-handler-phone')

  // One tap: the alert is saved with the time now.
  await page.getByRole('button', { name: 'Juniper alerted' }).click()
  const logged = page.getByTestId('diary-just-logged')
  await expect(logged).toContainText('Alert saved at')
  const savedAt = await logged.innerText()
  await logged.getByRole('button', { name: '1 h earlier' }).click()
  await expect(logged).not.toHaveText(savedAt)
  await shot(page, 'diary-handler-phone-logged')

  // Details afterwards, with a common alert in one tap.
  await logged.getByRole('button', { name: 'Add details or set the time' }).click()
  const form = page.getByRole('form', { name: 'Alert details' })
  await form.getByRole('button', { name: 'Nudged me' }).click()
  await expect(form.getByLabel('What the dog did')).toHaveValue('Nudged me')
  await form.getByLabel('Where you were').fill('Kitchen')
  await form.getByLabel('How sure you were it was an alert').selectOption('sure')
  await shot(page, 'diary-handler-phone-details')
  await form.getByRole('button', { name: 'Save the details' }).click()
  await expect(page.getByText('Details saved.')).toBeVisible()

  // The episode: the dog warned an hour ahead, so the summary counts one more migraine warned of.
  await page.getByRole('button', { name: 'Symptoms started' }).click()
  await expect(page.getByTestId('diary-just-logged')).toContainText('Episode saved at')
  await expect(summary).toContainText(`warned of ${before[0] + 1} of your last ${before[1] + 1} migraines`)
  const latest = page.getByTestId('diary-entry-episode').first()
  await expect(latest).toContainText('Warned 1 h ahead')
  await expect(page.getByTestId('diary-entry-alert').first()).toContainText('Kitchen')
  await shot(page, 'diary-handler-phone-after')
  const box = await page.getByTestId('diary-timeline').boundingBox()
  if (process.env.E2E_SCREENSHOTS && box) await page.screenshot({ path: `${process.env.E2E_SCREENSHOTS}/diary-handler-timeline.png`, fullPage: true, clip: { ...box, height: Math.min(box.height, 800) } })
})

test('on a phone, a time in the future is refused with a message beside the field, and nothing changes', async ({ page }) => {
  await page.setViewportSize(PHONE)
  await signInAs(page, HANDLER_A)
  await page.goto(`/handler/diary/${seedId('client:fairweather')}`)
  await page.waitForLoadState('networkidle') // hydrated: the buttons answer taps
  await page.getByRole('button', { name: 'Symptoms started' }).click()
  const logged = page.getByTestId('diary-just-logged')
  await expect(logged).toContainText('Episode saved at')
  await logged.getByRole('button', { name: 'Add details or set the time' }).click()
  const form = page.getByRole('form', { name: 'Episode details' })
  const next = new Date(Date.now() + 2 * 86_400_000)
  const value = `${next.getFullYear()}-${String(next.getMonth() + 1).padStart(2, '0')}-${String(next.getDate()).padStart(2, '0')}T09:00`
  await form.getByLabel('When the first symptoms began').fill(value)
  await form.getByRole('button', { name: 'Save the details' }).click()
  await expect(form.getByRole('alert').first()).toContainText('An episode cannot start in the future')
  await shot(page, 'diary-handler-phone-future')
})

test('the trainer sees the drop in the Nakashima diary, the lead-time chart and its table, and reviews an alert', async ({ page }) => {
  await page.setViewportSize(DESKTOP)
  await signInAs(page, TRAINER_A)
  await page.goto(`/trainer/clients/${NAKASHIMA}`)
  const card = page.getByTestId('diary-card')
  await expect(card).toContainText('Refresher suggested')
  if (process.env.E2E_SCREENSHOTS) await card.screenshot({ path: `${process.env.E2E_SCREENSHOTS}/diary-file-card.png` })
  await card.getByRole('link', { name: 'Open the diary' }).click()
  await expect(page).toHaveURL(new RegExp(`/trainer/clients/${NAKASHIMA}/diary$`))
  await expect(page.getByText(/Fewer episodes warned of lately/)).toBeVisible()
  const chart = page.getByTestId('diary-lead-chart')
  await expect(chart.locator('canvas')).toBeVisible()
  // The table behind the chart: one row per month, the last month with few warned of.
  const table = page.getByTestId('diary-lead-table')
  await expect(table.locator('tbody tr')).not.toHaveCount(0)
  await chart.getByRole('button', { name: 'Show as a table' }).click()
  await expect(table).toBeVisible()
  await expect(page.getByTestId('diary-caution')).toContainText('never replaces it')
  await shot(page, 'diary-trainer-desktop')
  if (process.env.E2E_SCREENSHOTS) await chart.screenshot({ path: `${process.env.E2E_SCREENSHOTS}/diary-trainer-chart.png` })

  const firstAlert = page.getByTestId('diary-entry-alert').first()
  await firstAlert.getByRole('button', { name: 'Mark reviewed' }).click()
  const review = page.getByRole('form', { name: 'Review this alert' })
  await review.getByLabel('Review comment').fill('Short lead again: book a refresher on the early signs.')
  await review.getByRole('button', { name: 'Mark reviewed' }).click()
  await expect(page.getByText('The alert is marked as reviewed.')).toBeVisible()
  await expect(page.getByTestId('diary-entry-alert').first().getByTestId('diary-review')).toContainText('Short lead again')
})

test('the trainer sets a narrower window for a client and the figures follow', async ({ page }) => {
  await page.setViewportSize(DESKTOP)
  await signInAs(page, TRAINER_A)
  await page.goto(`/trainer/clients/${seedId('client:fairweather')}/diary`)
  const windowCard = page.getByTestId('diary-window')
  await expect(windowCard).toContainText('the business policy for this condition')
  const warned = page.getByTestId('diary-warned').first()
  const before = await warned.innerText()
  await windowCard.getByRole('button', { name: "Set this client's window" }).click()
  await windowCard.getByLabel('Counts from (minutes before onset)').fill('30')
  await windowCard.getByLabel('Counts up to (minutes before onset)').fill('60')
  await windowCard.getByRole('button', { name: 'Save the window' }).click()
  await expect(windowCard.getByText(/must not be more than/)).toBeVisible()
  await windowCard.getByLabel('Counts up to (minutes before onset)').fill('0')
  await windowCard.getByRole('button', { name: 'Save the window' }).click()
  await expect(windowCard).toContainText('set for this client')
  await expect(warned).not.toHaveText(before)
  await shot(page, 'diary-trainer-window')
})

test('the admin finds the diary policy on the policies page, with a window per condition', async ({ page }) => {
  await page.setViewportSize(DESKTOP)
  await signInAs(page, 'admin@forescent.test')
  await page.goto('/admin/settings')
  const form = page.getByTestId('setting-diary')
  await expect(form).toContainText('Alert diary')
  await expect(form.getByLabel('Refresher when warned of below (%)')).toHaveValue('60')
  await expect(form.locator('[id$="-migraine-maxMinutes"]')).toHaveValue('240')
  await expect(form.locator('[id$="-hypoglycaemia-maxMinutes"]')).toHaveValue('60')
  if (process.env.E2E_SCREENSHOTS) await form.screenshot({ path: `${process.env.E2E_SCREENSHOTS}/diary-admin-policy.png` })
})
