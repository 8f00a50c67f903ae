import { expect, test } from '@playwright/test'
import { waitForMail } from '../support/http'
import { CLIENT_A, HANDLER_A, TRAINER_A } from '../support/people'
import { resetDatabase } from '../support/stack'
import { DESKTOP, PHONE, shot, signInAs } from './helpers'

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
