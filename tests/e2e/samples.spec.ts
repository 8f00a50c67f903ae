import { expect, test, type Page } from '@playwright/test'
import { seedId } from '../../scripts/lib/seed-data'
import { ADMIN, HANDLER_A, TRAINER_A } from '../support/people'
import { resetDatabase } from '../support/stack'
import { DESKTOP, PHONE, shot, signInAs } from './helpers'

// These tests add samples to the Fairweather bank: start from, and leave behind, the plain demo.
test.beforeAll(async () => { await resetDatabase(process.env.E2E_DATABASE_URL!) })
test.afterAll(async () => { await resetDatabase(process.env.E2E_DATABASE_URL!) })

const CLIENT_A = seedId('client:fairweather')

test('a handler collects a control on a phone, step by step, and the trainer sees the stock change', async ({ page, browser }) => {
  await page.setViewportSize(PHONE)
  await signInAs(page, HANDLER_A)
  await page.getByTestId('handler-samples-button').first().click()
  await expect(page.getByRole('heading', { name: 'Our samples' })).toBeVisible()
  // The demo bank: 15 control uses left (5 fresh bags of 3 uses, common practice).
  await expect(page.getByTestId('handler-uses-left-control')).toHaveText('15')
  await expect(page.getByTestId('sample-cautions')).toContainText('biological material')
  await shot(page, 'samples-handler-stock-phone')

  await page.getByTestId('collect-button').click()
  await expect(page.getByTestId('step-count')).toHaveText('Step 1 of 13')
  await page.getByRole('button', { name: /Control: I am well/ }).click()
  // Seven checklist questions, one a screen: Next stays off until each is answered.
  for (let i = 0; i < 7; i++) {
    await expect(page.getByTestId('next')).toBeDisabled()
    await page.getByRole('button', { name: /^No, not in the last/ }).click()
    if (i === 0) await shot(page, 'samples-collect-question-phone')
    await page.getByTestId('next').click()
  }
  await page.getByRole('button', { name: 'Yes, with unscented soap' }).click()
  await page.getByTestId('next').click()
  await expect(page.getByRole('heading', { name: 'Collect the sample' })).toBeVisible()
  await page.getByRole('button', { name: 'One roll more' }).click()
  await expect(page.getByTestId('rolls')).toHaveText('4')
  await page.getByRole('button', { name: 'Save the sample' }).click()

  const code = page.getByTestId('bag-code')
  // Made on the phone: one character longer than a server-made code (shared/utils/bag-codes.ts).
  await expect(code).toHaveText(/^C-[A-HJ-NP-Z2-9]{5}$/)
  const bagCode = (await code.textContent())!.trim()
  await expect(page.getByText('Use a pencil')).toBeVisible()
  await shot(page, 'samples-collect-code-phone')
  await page.getByRole('button', { name: 'I have written it on the bag' }).click()
  // The outer bag with room is chosen for it (3 of 5 control bags).
  await expect(page.getByRole('radio', { name: /Control bag 2/ })).toBeChecked()
  await shot(page, 'samples-collect-store-phone')
  await page.getByRole('button', { name: 'The bag is in the freezer' }).click()
  await expect(page.getByRole('heading', { name: 'Saved' })).toBeVisible()
  await page.getByRole('link', { name: 'Back to our samples' }).click()
  await expect(page.getByTestId('handler-uses-left-control')).toHaveText('18')
  await expect(page.getByTestId('ready-sample').filter({ hasText: bagCode })).toBeVisible()

  // The trainer, on a desktop, sees the new bag and the stock.
  const desk = await browser.newPage()
  await desk.setViewportSize(DESKTOP)
  await signInAs(desk, TRAINER_A)
  await desk.goto(`/trainer/clients/${CLIENT_A}`)
  await expect(desk.getByTestId('sample-bank-card')).toContainText('18')
  await desk.getByTestId('sample-bank-card').getByRole('link', { name: 'Open the sample bank' }).click()
  await expect(desk.getByRole('heading', { name: 'Sample bank' })).toBeVisible()
  await expect(desk.getByTestId('uses-left-control')).toHaveText('18')
  await expect(desk.getByTestId('sample-table')).toContainText(bagCode)
  await expect(desk.getByTestId('sample-attention')).toContainText('saved quickly') // the demo's quick-saved target
  await shot(desk, 'samples-trainer-bank-desktop')
  await desk.close()
})

/** The checklist as asked before collecting: a meal `minutes` ago, nothing else, hands washed with unscented soap. */
async function answerChecklistAfterAMeal(page: Page, minutes: number) {
  await page.getByTestId('question-lastAteAt').getByRole('button', { name: /^Yes, within/ }).click()
  await page.getByLabel('How many minutes ago?').fill(String(minutes))
  await page.getByTestId('next').click()
  for (let i = 0; i < 6; i++) {
    await page.getByRole('button', { name: /^No, not in the last/ }).click()
    await page.getByTestId('next').click()
  }
  await page.getByRole('button', { name: 'Yes, with unscented soap' }).click()
  await page.getByTestId('next').click()
}

test('the checklist comes first: a control after a meal 20 minutes ago waits 25 more minutes, with a reminder, then is collected clean', async ({ page, context }) => {
  await context.grantPermissions(['notifications'])
  await page.clock.install()
  await page.setViewportSize(PHONE)
  await signInAs(page, HANDLER_A)
  await page.goto(`/handler/samples/${CLIENT_A}/collect`)
  await page.getByRole('button', { name: /Control: I am well/ }).click()
  // Asked before any roll goes in the mouth: "in the last 45 minutes", "how many minutes ago".
  await expect(page.getByTestId('question-lastAteAt')).toContainText('In the last 45 minutes.')
  await answerChecklistAfterAMeal(page, 20)
  // The fasting limit is 45 minutes (common practice): 25 more to go, and no way on to collecting until then.
  await expect(page.getByTestId('wait-text')).toHaveText('Wait 25 more minutes')
  await expect(page.getByTestId('collect-wait')).toContainText('eating: clear at')
  await expect(page.getByTestId('next')).toBeDisabled()
  await page.getByTestId('remind-me').click()
  await expect(page.getByTestId('reminder-set')).toContainText('The phone will buzz')
  await shot(page, 'samples-collect-wait-phone')
  await page.clock.fastForward('10:00')
  await expect(page.getByTestId('wait-text')).toHaveText('Wait 15 more minutes')
  await page.clock.fastForward('15:01')
  await expect(page.getByRole('heading', { name: 'Time to collect' })).toBeVisible()
  await expect(page.getByTestId('next')).toBeEnabled()
  await page.getByTestId('next').click()
  await expect(page.getByRole('heading', { name: 'Collect the sample' })).toBeVisible()
  // (The page's clock now runs 25 minutes ahead of the server's, so the sample is not saved from this page.)
})

test('a target is collected at once after the checklist, even after a meal: the flag is recorded as before', async ({ page }) => {
  await page.setViewportSize(PHONE)
  await signInAs(page, HANDLER_A)
  await page.goto(`/handler/samples/${CLIENT_A}/collect`)
  await page.getByRole('button', { name: /Target: an episode is starting/ }).click()
  await page.getByRole('button', { name: 'Just now' }).click()
  await page.getByTestId('next').click()
  await page.getByRole('button', { name: 'No medication yet' }).click()
  await page.getByTestId('next').click()
  await answerChecklistAfterAMeal(page, 20)
  await expect(page.getByRole('heading', { name: 'Collect the sample' })).toBeVisible()
  await page.getByRole('button', { name: 'Save the sample' }).click()
  await expect(page.getByTestId('bag-code')).toHaveText(/^T-/)
  await expect(page.getByTestId('compromised-note')).toContainText('Only 20 minutes passed between eating and collecting')
})

test('during an episode the handler saves a target quickly, answers the checklist later, and takes it out for training', async ({ page }) => {
  await page.setViewportSize(PHONE)
  await signInAs(page, HANDLER_A)
  await page.goto(`/handler/samples/${CLIENT_A}/collect`)
  await page.getByRole('button', { name: /Target: an episode is starting/ }).click()
  await page.getByTestId('quick-save').click()
  await expect(page.getByRole('heading', { name: 'When did the first symptoms begin?' })).toBeVisible()
  await page.getByRole('button', { name: '10 minutes ago' }).click()
  await page.getByTestId('next').click()
  // One tap for medication before collecting (a target taken after medication is flagged for the trainer).
  await expect(page.getByRole('heading', { name: 'Did you take any medication for this episode before collecting?' })).toBeVisible()
  await expect(page.getByTestId('next')).toBeDisabled()
  await page.getByRole('button', { name: 'No medication yet' }).click()
  await page.getByTestId('next').click()
  await expect(page.getByRole('heading', { name: 'Save it quickly' })).toBeVisible()
  await page.getByRole('button', { name: 'Save the sample' }).click()
  await expect(page.getByTestId('bag-code')).toHaveText(/^T-/)
  const bagCode = (await page.getByTestId('bag-code').textContent())!.trim()
  await page.getByRole('button', { name: 'I have written it on the bag' }).click()
  await page.getByRole('button', { name: 'Later' }).click()
  await page.getByRole('link', { name: 'See this sample' }).click()
  await expect(page.getByTestId('sample-code')).toHaveText(bagCode)
  await expect(page.getByTestId('sample-status')).toHaveText('Checklist to finish')

  // Later: the checklist, all on one page. A meal 20 minutes before collecting compromises it (45 minutes, common practice).
  const checklist = page.getByTestId('finish-checklist')
  await checklist.getByTestId('question-lastAteAt').getByRole('button', { name: /^Yes, within/ }).click()
  await checklist.getByLabel('How many minutes before collecting?').fill('20')
  for (const q of ['lastDrankOtherThanWaterAt', 'lastBrushedTeethAt', 'lastChewingGumAt', 'lastAlcoholAt', 'lastSmokedAt', 'lastWaterAt']) {
    await checklist.getByTestId(`question-${q}`).getByRole('button', { name: /^No, not in the last/ }).click()
  }
  await checklist.getByRole('button', { name: 'Yes, with unscented soap' }).click()
  await checklist.getByRole('button', { name: 'Save the answers' }).click()
  await expect(page.getByTestId('sample-status')).toHaveText('Compromised')
  await expect(page.getByText('Only 20 minutes passed between eating and collecting')).toBeVisible()
  await shot(page, 'samples-compromised-phone')

  // A ready sample goes out and back in.
  await page.goto(`/handler/samples/${CLIENT_A}`)
  await page.getByTestId('ready-sample').first().click()
  await expect(page.getByTestId('take-out')).toBeVisible()
  const before = Number((await page.getByTestId('sample-uses-left').textContent())!.trim().split(' ')[0])
  await page.getByTestId('take-out-button').click()
  await expect(page.getByTestId('open-use')).toContainText('Put it back within 5 minutes')
  await page.getByRole('button', { name: 'It is back in the freezer' }).click()
  await expect(page.getByTestId('take-out')).toBeVisible()
  await expect(page.getByTestId('sample-uses-left')).toHaveText(`${before - 1} of 3`)
  await expect(page.getByTestId('sample-uses')).toContainText('Discrimination')
})

test('the admin changes a sample rule on the policies page, and restores the common-practice defaults', async ({ page }) => {
  await page.setViewportSize(DESKTOP)
  await signInAs(page, ADMIN)
  await page.goto('/admin/settings')
  const form = page.getByTestId('setting-samples')
  await expect(form.getByRole('heading', { name: 'Scent samples' })).toBeVisible()
  const rolls = form.getByLabel('Most cotton rolls in one small bag')
  await expect(rolls).toHaveValue('6') // common practice
  await rolls.fill('4')
  await form.getByRole('button', { name: 'Save' }).click()
  await expect(form.getByText('Saved.')).toBeVisible()
  await page.reload()
  await expect(page.getByTestId('setting-samples').getByLabel('Most cotton rolls in one small bag')).toHaveValue('4')
  await shot(page, 'samples-policy-admin-desktop')
  await page.getByTestId('setting-samples').getByRole('button', { name: 'Fill in the defaults' }).click()
  await page.getByTestId('setting-samples').getByRole('button', { name: 'Save' }).click()
  await expect(page.getByTestId('setting-samples').getByText('Saved.')).toBeVisible()
  await page.reload()
  await expect(page.getByTestId('setting-samples').getByLabel('Most cotton rolls in one small bag')).toHaveValue('6')
})
