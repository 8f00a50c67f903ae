import { expect, test } from '@playwright/test'
import { seedId } from '../../scripts/lib/seed-data'
import { waitForMail } from '../support/http'
import { CLIENT_A, HANDLER_A, TRAINER_A } from '../support/people'
import { resetDatabase } from '../support/stack'
import { DESKTOP, PHONE, outboxItems, shot, signInAs } from './helpers'

// These tests log sessions and sign off a milestone: start from, and leave behind, the plain demo.
test.beforeEach(async () => { await resetDatabase(process.env.E2E_DATABASE_URL!) })
test.afterAll(async () => { await resetDatabase(process.env.E2E_DATABASE_URL!) })

test('on a phone, the trainer logs a blind session tap by tap, undoes one, signs off the milestone, and the handler is e-mailed', async ({ page }) => {
  await page.setViewportSize(PHONE)
  await signInAs(page, TRAINER_A)
  await page.goto(`/trainer/clients/${CLIENT_A}/training`)
  const readiness = page.getByTestId('readiness')
  await expect(page.getByTestId('criterion-trials')).toContainText('30 trials')
  await expect(page.getByTestId('criterion-blind')).toContainText('8 more blind trials')

  await page.getByTestId('session-place').fill('Village hall')
  await page.getByTestId('session-blind').check()
  await page.getByTestId('start-session').click()
  // Six hits, rotating the target over three stations, then six quiet blanks: one tap each.
  for (let i = 0; i < 6; i++) {
    const n = (i % 3) + 1
    await page.getByTestId(`target-${n}`).click()
    await page.getByTestId(`indicated-${n}`).click()
  }
  await page.getByTestId('target-blank').click()
  for (let i = 0; i < 6; i++) await page.getByTestId('indicated-none').click()
  // A mis-tap, undone.
  await page.getByTestId('indicated-2').click()
  await expect(page.getByTestId('pad-summary')).toContainText('13 trials')
  await page.getByTestId('undo-trial').click()
  await expect(page.getByTestId('pad-summary')).toContainText('12 trials · 6 hits · 0 misses · 0 false alerts')
  await page.getByTestId('finish-session').click()

  // The figures moved: 42 trials, 6 sessions, enough blind; specificity's lower bound is still short.
  await expect(page.getByTestId('criterion-trials')).toHaveAttribute('data-met', 'true')
  await expect(page.getByTestId('criterion-trials')).toContainText('42 trials')
  await expect(page.getByTestId('criterion-blind')).toHaveAttribute('data-met', 'true')
  await expect(page.getByTestId('criterion-specificity')).toHaveAttribute('data-met', 'false')
  await shot(page, 'training-phone-readiness')

  // Signing off without a reason is refused; with one it goes through.
  await page.getByTestId('confirm-milestone').click()
  await expect(page.getByTestId('programme-error')).toContainText('Write why you sign it off anyway')
  await page.getByTestId('confirm-reason').fill('Watched three clean blind searches in person; more blanks next week.')
  await page.getByTestId('confirm-milestone').click()
  await expect(page.getByTestId('milestone-3')).toContainText('Reached')
  await expect(page.getByTestId('milestone-4')).toContainText('Working on it now')
  await expect(readiness).toBeVisible()

  const mail = await waitForMail(process.env.E2E_MAIL_URL!, HANDLER_A, 'Milestone reached: Discrimination')
  expect(mail.text).toContain('What comes next: Trained alert behaviour')
})

test('the reliability charts, with their data tables, on desktop and for the handler on a phone', async ({ page }) => {
  await page.setViewportSize(DESKTOP)
  await signInAs(page, TRAINER_A)
  await page.goto(`/trainer/clients/${CLIENT_A}/training`)
  await expect(page.getByTestId('training-charts').locator('canvas').first()).toBeVisible()
  await expect(page.getByTestId('reliability-table').locator('tbody tr')).toHaveCount(5)
  await shot(page, 'training-desktop-charts')
})

test('the handler sees progress in plain words on a phone', async ({ page }) => {
  await page.setViewportSize(PHONE)
  await signInAs(page, HANDLER_A)
  await page.getByTestId('handler-training-button').first().click()
  await expect(page.getByTestId('training-programme')).toContainText('Discrimination')
  await expect(page.getByTestId('readiness')).toContainText('the true figure most likely lies between')
  await expect(page.getByTestId('confirm-milestone')).toHaveCount(0)
  await shot(page, 'training-phone-handler')
})

test('on a phone, the trainer adjusts the programme: adds, renames, moves and removes milestones', async ({ page }) => {
  await page.setViewportSize(PHONE)
  await signInAs(page, TRAINER_A)
  await page.goto(`/trainer/clients/${CLIENT_A}/training`)
  await page.getByTestId('adjust-programme').click()
  const editor = page.getByTestId('programme-editor')
  // Add one before "Trained alert behaviour" (place 5).
  await editor.getByTestId('add-name').fill('Alerts in the car')
  await editor.getByTestId('add-text').fill('Your dog alerts just as well on car journeys.')
  await editor.getByTestId('add-position').selectOption({ label: 'Before 5. Trained alert behaviour' })
  await editor.getByTestId('add-submit').click()
  await expect(editor.getByTestId('edit-milestone-4')).toContainText('5. Alerts in the car')
  // Rename it, move it below, then remove it.
  await editor.getByTestId('edit-4').click()
  await editor.getByTestId('edit-name').fill('Alerts on car journeys')
  await editor.getByTestId('save-milestone').click()
  await expect(editor.getByTestId('edit-milestone-4')).toContainText('Alerts on car journeys')
  await editor.getByTestId('move-down-4').click()
  await expect(editor.getByTestId('edit-milestone-5')).toContainText('6. Alerts on car journeys')
  await expect(editor.getByTestId('edit-milestone-4')).toContainText('Trained alert behaviour')
  await shot(page, 'training-phone-adjust')
  page.once('dialog', d => d.accept())
  await editor.getByTestId('remove-5').click()
  await expect(editor.getByTestId('edit-milestone-5')).toContainText('6. Generalisation')
  await expect(editor.locator('ol')).not.toContainText('Alerts on car journeys')
  await editor.getByTestId('editor-done').click()
  await expect(page.getByTestId('milestone-4')).toContainText('Trained alert behaviour')
  await expect(page.getByTestId('milestone-9')).toContainText('Aftercare')
})

test('trials tapped without a signal survive a reload and are sent once when the signal is back', async ({ page }) => {
  await page.setViewportSize(PHONE)
  await signInAs(page, TRAINER_A)
  await page.goto(`/trainer/clients/${CLIENT_A}/training`)
  await page.getByTestId('session-blind').check()
  await page.getByTestId('start-session').click()
  await page.getByTestId('target-1').click()
  await page.getByTestId('indicated-1').click()
  await expect(page.getByTestId('pad-trials')).not.toContainText('waiting to send')
  // The signal drops (trials cannot reach the server): two more trials wait on the phone.
  const noSignal = (route: import('@playwright/test').Route) => route.abort('internetdisconnected')
  await page.route('**/api/training-sessions/*/trials', noSignal)
  await page.getByTestId('indicated-1').click()
  await page.getByTestId('target-blank').click()
  await page.getByTestId('indicated-none').click()
  await expect(page.getByTestId('pad-trials')).toContainText('waiting to send')
  await expect(page.getByTestId('pad-summary')).toContainText('3 trials')
  // A reload while still without a signal: the session reopens with the two trials still waiting.
  await page.reload()
  await expect(page.getByTestId('pad-summary')).toContainText('3 trials · 2 hits')
  await expect(page.getByTestId('pad-trials').getByText('waiting to send')).toHaveCount(2)
  // The signal is back: the queue is sent, each trial stored once.
  await page.unroute('**/api/training-sessions/*/trials', noSignal)
  await expect(page.getByTestId('pad-trials')).not.toContainText('waiting to send')
  await page.getByTestId('finish-session').click()
  await expect(page.getByTestId('criterion-trials')).toContainText('33 trials')
  await expect.poll(async () => (await outboxItems(page)).length).toBe(0)
})

test('the trainer\'s session list across clients, and a dog\'s reliability page, at phone and desktop widths', async ({ page }) => {
  for (const size of [PHONE, DESKTOP]) {
    await page.setViewportSize(size)
    if (size === PHONE) await signInAs(page, TRAINER_A)
    await page.goto('/trainer/training')
    const list = size === PHONE ? page.getByTestId('session-cards') : page.getByTestId('session-table')
    await expect(page.getByTestId('session-total')).toContainText('5 sessions')
    await page.getByTestId('session-blind-filter').selectOption('yes')
    await expect(page.getByTestId('session-total')).toContainText('2 sessions')
    await expect(list).toContainText('Village hall')
    await shot(page, `training-sessions-${size === PHONE ? 'phone' : 'desktop'}`)
    await page.goto(`/trainer/dogs/${seedId('dog:fairweather')}`)
    await page.getByTestId('dog-reliability-link').click()
    await expect(page.getByRole('heading', { level: 1 })).toContainText('measured reliability')
    await expect(page.getByTestId('reliability-blind')).toContainText('12 trials')
    await expect(page.getByTestId('training-charts').locator('canvas').first()).toBeVisible()
    await shot(page, `dog-reliability-${size === PHONE ? 'phone' : 'desktop'}`)
  }
})
