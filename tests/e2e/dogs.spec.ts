import { expect, test, type Page } from '@playwright/test'
import { seedId } from '../../scripts/lib/seed-data'
import { todayInTimeZone } from '../../shared/utils/dogs'
import { HANDLER_A, TRAINER_A } from '../support/people'
import { resetDatabase } from '../support/stack'
import { DESKTOP, PHONE, shot, signInAs } from './helpers'

// These tests change Juniper's profile: start from, and leave behind, the plain demo.
test.beforeAll(async () => { await resetDatabase(process.env.E2E_DATABASE_URL!) })
test.afterAll(async () => { await resetDatabase(process.env.E2E_DATABASE_URL!) })

const day = (offset: number) => {
  const [y, m, d] = todayInTimeZone('Europe/London').split('-').map(Number)
  return new Date(Date.UTC(y!, m! - 1, d! + offset)).toISOString().slice(0, 10)
}

async function openJuniperAsTrainer(page: Page) {
  await signInAs(page, TRAINER_A)
  await page.goto('/trainer/roster') // the trainer lands on Today; the roster is one tap away
  await page.getByRole('link', { name: /Fairweather household/ }).click()
  await expect(page.getByTestId('client-title')).toHaveText('Fairweather household')
  const dogs = page.getByTestId('client-dogs')
  await expect(dogs).toContainText('In training')
  await expect(dogs).toContainText('Due soon') // the demo's Leptospirosis booster
  await dogs.getByRole('link', { name: /Juniper/ }).click()
  await expect(page).toHaveURL(/\/trainer\/dogs\//)
  await expect(page.getByTestId('dog-name')).toHaveText('Juniper')
}

test('the trainer opens Juniper from the Fairweather file, records a health record and an assessment, and sees the flags', async ({ page }) => {
  await page.setViewportSize(DESKTOP)
  await openJuniperAsTrainer(page)
  await expect(page.getByTestId('health-flag')).toHaveText(/1 due soon/)
  await expect(page.getByRole('button', { name: /^Edit Leptospirosis booster/ })).toBeVisible()
  await expect(page.getByTestId('status-timeline')).toContainText('In training')
  await shot(page, 'dog-profile-trainer-desktop')

  // A health record through the form: the schema's errors first, then an overdue vaccination.
  await page.getByRole('button', { name: 'Add a health record' }).click()
  const form = page.getByRole('form', { name: 'Add a health record' })
  await form.getByLabel('Done on').fill('')
  await form.getByRole('button', { name: 'Add the record' }).click()
  await expect(form.getByText('Name it, e.g. "Rabies" or "Hip score".')).toBeVisible()
  await form.getByLabel('Kind').selectOption('vaccination')
  await form.getByLabel('What was done').fill('Rabies')
  await form.getByLabel('Done on').fill(day(-370))
  await form.getByLabel('Due again on').fill(day(-5))
  await shot(page, 'dog-health-form-desktop')
  await form.getByRole('button', { name: 'Add the record' }).click()
  await expect(page.getByText('The health records are updated.')).toBeVisible()
  const records = page.getByTestId('health-records')
  const rabies = records.getByRole('row').filter({ hasText: 'Rabies' })
  await expect(rabies.locator('[data-state="overdue"]').filter({ visible: true })).toHaveText(/Overdue by 5 days/)
  await expect(page.getByTestId('health-flag')).toHaveText(/1 overdue, 1 due soon/)

  // A suitability assessment through the form.
  await page.getByRole('button', { name: 'Record an assessment' }).click()
  const assess = page.getByRole('form', { name: 'Record a suitability assessment' })
  await assess.getByRole('button', { name: 'Save the assessment' }).click()
  await expect(assess.getByText('Score scent drive from 1 to 5.')).toBeVisible()
  for (const [trait, score] of [['Scent drive', 5], ['Focus', 4], ['Environmental confidence', 4], ['Sociability', 2], ['Recovery from startle', 4], ['Handler engagement', 5]] as const) {
    // The radios are visually hidden behind their numbered labels: choose each by keyboard, as a keyboard user would
    // (a forced click lands on the 1-pixel input's position and can miss it on a slow machine).
    const radio = assess.getByLabel(`${trait}: ${score},`)
    await radio.focus()
    await radio.press('Space')
    await expect(radio).toBeChecked()
  }
  await expect(assess.getByTestId('assessment-summary')).toContainText('Average 4 of 5')
  await expect(assess.getByTestId('assessment-summary')).toContainText('Below 3: Sociability')
  await assess.getByLabel('Accept into the programme').check()
  await assess.getByRole('button', { name: 'Save the assessment' }).click()
  await expect(assess.getByText('say in the notes why you accept')).toBeVisible()
  await assess.getByLabel('Notes').fill('Reserved with strangers at first; warmed up within ten minutes.')
  await shot(page, 'dog-assessment-form-desktop')
  await assess.getByRole('button', { name: 'Save the assessment' }).click()
  await expect(page.getByText('The assessment is saved.')).toBeVisible()
  const latest = page.getByTestId('assessments').getByRole('listitem').first()
  await expect(latest).toContainText('Accepted')
  await expect(latest).toContainText('Reserved with strangers')
  await expect(latest).toContainText('2 · below 3')
  await shot(page, 'dog-profile-after-desktop')
})

test('the status form names the acceptance rule for a new dog, and the phone layout holds', async ({ page }) => {
  await page.setViewportSize(PHONE)
  await signInAs(page, TRAINER_A)
  await page.goto('/trainer/roster') // the trainer lands on Today; the roster is one tap away
  await page.getByRole('link', { name: /Fairweather household/ }).click()
  await page.getByRole('button', { name: 'Add a dog' }).click()
  const add = page.getByRole('form', { name: 'Add a dog' })
  await add.getByLabel('Name').fill('Bramble')
  await add.getByLabel('Microchip number').fill('12345')
  await add.getByRole('button', { name: 'Add the dog' }).click()
  await expect(add.getByText('A microchip number has 15 digits')).toBeVisible()
  await add.getByLabel('Microchip number').fill('999 000 000 090 001')
  await add.getByLabel('Breed').fill('Flat-coated Retriever')
  await add.getByLabel('Where the dog comes from').selectOption('rescue')
  await shot(page, 'dog-add-form-phone')
  await add.getByRole('button', { name: 'Add the dog' }).click()
  await expect(page.getByText('Bramble is added and starts in assessment.')).toBeVisible()
  await page.getByTestId('client-dogs').getByRole('link', { name: /Bramble/ }).click()
  await expect(page.getByTestId('dog-name')).toHaveText('Bramble')
  await expect(page.getByText('999 000 000 090 001')).toBeVisible()
  await page.getByRole('button', { name: 'Record a status change' }).click()
  await page.getByLabel('New status for Bramble').selectOption('in-training')
  await expect(page.getByRole('note')).toContainText("outcome 'accept' before the dog starts training")
  const statusForm = page.getByRole('form', { name: 'Record a status change' })
  await statusForm.getByRole('button', { name: 'Record the change' }).click()
  // The server's refusal shows once, beside the status (not repeated as a banner and a note).
  await expect(statusForm.getByRole('alert')).toHaveText("Record a suitability assessment with the outcome 'accept' before the dog starts training.")
  await expect(statusForm.getByText("outcome 'accept'")).toHaveCount(1)
  await shot(page, 'dog-status-refused-phone')
})

test('the handler sees Juniper read-only on a phone, in plain words', async ({ page }) => {
  await page.setViewportSize(PHONE)
  await signInAs(page, HANDLER_A)
  await page.getByRole('link', { name: /Migraine · Fairweather household/ }).click()
  await expect(page.getByTestId('client-title')).toHaveText('Fairweather household')
  await page.getByTestId('client-dogs').getByRole('link', { name: /Juniper/ }).click()
  await expect(page).toHaveURL(/\/handler\/dogs\//)
  await expect(page.getByTestId('dog-name')).toHaveText('Juniper')
  await expect(page.getByText('Juniper: in training on the programme, since')).toBeVisible()
  await expect(page.getByText('never replace it')).toBeVisible()
  await expect(page.getByTestId('health-records')).toContainText('Leptospirosis booster')
  await expect(page.getByTestId('assessments')).toContainText('Accepted')
  // Nothing to change here.
  for (const name of [/^Edit/, /^Delete/, /^Record/, /^Add a/]) {
    await expect(page.getByRole('button', { name })).toHaveCount(0)
  }
  await expect(page.getByText('Replace photo')).toHaveCount(0)
  await expect(page.getByText('Add a photo')).toHaveCount(0)
  await shot(page, 'dog-profile-handler-phone')
  await page.setViewportSize(DESKTOP)
  await shot(page, 'dog-profile-handler-desktop')
})

test("another household's dog is not found", async ({ page }) => {
  await signInAs(page, HANDLER_A)
  await page.goto(`/handler/dogs/${seedId('dog:achterberg')}`)
  await expect(page.getByText('Nothing here')).toBeVisible()
})
