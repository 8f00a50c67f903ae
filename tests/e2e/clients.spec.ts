import { expect, test } from '@playwright/test'
import { ADMIN, TRAINER_A } from '../support/people'
import { waitForMail } from '../support/http'
import { DESKTOP, PHONE, shot, signInAs } from './helpers'

test('a trainer creates a client through the intake form and the handler is invited', async ({ page }) => {
  await page.setViewportSize(DESKTOP)
  await signInAs(page, TRAINER_A)
  await page.goto('/trainer/roster') // the trainer lands on Today; the roster is one tap away
  await page.getByRole('link', { name: 'New client' }).click()
  await expect(page.getByRole('heading', { name: 'New client' })).toBeVisible()
  // Submitting empty shows the schema's field errors.
  await page.getByRole('button', { name: 'Create client file' }).click()
  await expect(page.getByText('Name the household')).toBeVisible()
  await page.getByLabel('Household name').fill('Penrose household')
  await page.getByLabel('The person the dog will alert for').fill('Lior Penrose')
  await page.getByLabel('Condition the dog is trained for').selectOption('seizure')
  await page.getByLabel('What an episode looks like: typical early signs').fill('Goes still, then lip smacking')
  await page.getByLabel('Handler\'s name').fill('Noa Penrose')
  await page.getByLabel('Handler\'s e-mail').fill('noa.penrose@example.test')
  await page.getByLabel('Relationship').selectOption('parent')
  await shot(page, 'intake-form-desktop')
  await page.getByRole('button', { name: 'Create client file' }).click()
  await expect(page.getByTestId('client-title')).toHaveText('Penrose household')
  await expect(page.getByText('noa.penrose@example.test')).toBeVisible()
  await expect(page.getByTestId('activity')).toContainText('opened the client file')
  await shot(page, 'client-file-new-desktop')
  const mail = await waitForMail(process.env.E2E_MAIL_URL!, 'noa.penrose@example.test', 'Penrose household')
  expect(mail.text).toContain('/invitation/')
  // Back on the roster, the new household is there.
  await page.getByRole('link', { name: 'Roster', exact: true }).first().click()
  await page.getByLabel('Search clients').fill('Penrose')
  await expect(page.getByTestId('client-table')).toContainText('Penrose household')
})

test('roster column choices and page size stay after a reload', async ({ page }) => {
  await page.setViewportSize(DESKTOP)
  await signInAs(page, ADMIN)
  await page.goto('/admin/clients')
  await expect(page.getByTestId('client-table')).toContainText('Trainer')
  await page.getByText('Columns and rows').click()
  // Hidden by default (so the table fits a laptop screen); the office shows Condition and hides Dog.
  await expect(page.getByTestId('client-table').locator('th', { hasText: 'Condition' })).toHaveCount(0)
  await page.getByLabel('Condition', { exact: true }).last().check()
  await page.getByLabel('Dog', { exact: true }).last().uncheck()
  await page.getByLabel('Rows per page').selectOption('10')
  await expect(page.getByText(/clients · page 1 of/)).toBeVisible()
  await page.reload()
  await expect(page.getByLabel('Rows per page')).toHaveValue('10')
  await expect(page.getByTestId('client-table').locator('th', { hasText: 'Condition' })).toHaveCount(1)
  await expect(page.getByTestId('client-table').locator('th', { hasText: 'Dog' })).toHaveCount(0)
  await shot(page, 'admin-clients-desktop')
})

test('the roster and a client file read well on a phone', async ({ page }) => {
  await page.setViewportSize(PHONE)
  await signInAs(page, TRAINER_A)
  await page.goto('/trainer/roster') // the trainer lands on Today; the roster is one tap away
  await expect(page.getByTestId('client-cards')).toContainText('Fairweather household')
  await expect(page.getByTestId('client-table')).toBeHidden()
  await page.getByLabel('Sort by').selectOption('started:asc')
  await expect(page.getByTestId('client-cards').locator('a').first()).toContainText('Nakashima household')
  await shot(page, 'trainer-roster-phone')
  await page.getByRole('link', { name: /Moreau household/ }).click()
  await expect(page.getByTestId('client-title')).toHaveText('Moreau household')
  await shot(page, 'trainer-client-file-phone')
})
