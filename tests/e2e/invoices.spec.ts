// The household pays an invoice by card on fake-services/stripe's payment page, comes back, sees it paid, and the
// receipt reaches the fake inbox.
import { expect, test } from '@playwright/test'
import { seedId } from '../../scripts/lib/seed-data'
import { waitForMail } from '../support/http'
import { ADMIN, HANDLER_A } from '../support/people'
import { resetDatabase } from '../support/stack'
import { DESKTOP, PHONE, shot, signInAs } from './helpers'

const OPEN_A = seedId('invoice:fair-2')

test.beforeEach(async () => { await resetDatabase(process.env.E2E_DATABASE_URL!) })
test.afterAll(async () => { await resetDatabase(process.env.E2E_DATABASE_URL!) })

test('a handler pays an open invoice by card and sees it paid', async ({ page }) => {
  await page.setViewportSize(PHONE)
  await signInAs(page, HANDLER_A)
  await page.getByTestId('handler-invoices-button').first().click()
  await expect(page).toHaveURL(/\/handler\/invoices$/)
  await expect(page.getByTestId('invoices-owed')).toHaveText('£402.00')
  await shot(page, 'invoices-handler-list')
  await page.goto(`/handler/invoices/${OPEN_A}`)
  await expect(page.getByTestId('invoice-balance')).toHaveText('£402.00')
  await shot(page, 'invoices-handler-detail')
  await page.getByTestId('invoice-pay').click()

  // The fake's payment page: a declined card first, then the card that succeeds.
  await expect(page.getByRole('heading', { name: 'Pay £402.00' })).toBeVisible()
  await page.getByLabel('Card number').fill('4000 0000 0000 0002')
  await page.getByRole('button', { name: /^Pay/ }).click()
  await expect(page.getByRole('alert')).toContainText('declined')
  await page.getByLabel('Card number').fill('4242 4242 4242 4242')
  await page.getByRole('button', { name: /^Pay/ }).click()

  await expect(page).toHaveURL(new RegExp(`/handler/invoices/${OPEN_A}\\?paid=1`))
  await expect(page.getByTestId('invoice-paid-note')).toBeVisible({ timeout: 15_000 })
  await expect(page.getByTestId('invoice-state')).toHaveText('Paid')
  await shot(page, 'invoices-handler-paid')
  const receipt = await waitForMail(process.env.E2E_MAIL_URL!, HANDLER_A, 'Receipt for £402.00')
  expect(receipt.text).toContain('paid in full')
})

test('the office sees aged receivables, filters the invoices and issues a draft', async ({ page }) => {
  await page.setViewportSize(DESKTOP)
  await signInAs(page, ADMIN)
  await page.goto('/admin/invoices')
  await expect(page.getByTestId('aged-receivables')).toContainText('Not yet due')
  await expect(page.getByTestId('invoice-table')).toContainText('Moreau household')
  await shot(page, 'invoices-admin-table')
  await expect(page.getByTestId('revenue-chart')).toContainText('Money received by month')
  // A plan's instalments still to come are listed only under "Planned instalments", "planned" for their issue date.
  await page.getByTestId('invoice-filter').selectOption('scheduled')
  await expect(page.getByTestId('invoice-table').locator('tbody tr', { hasText: 'Achterberg household' }).first()).toContainText(/planned \d{4}-\d{2}-\d{2}/)
  // The hand-made Lindgren draft.
  await page.getByTestId('invoice-filter').selectOption('draft')
  const lindgren = page.getByTestId('invoice-table').locator('tbody tr', { hasText: 'Lindgren household' })
  await expect(lindgren).toHaveCount(1)
  await expect(page.getByTestId('invoice-table').locator('tbody tr', { hasText: 'Achterberg household' })).toHaveCount(0)
  await lindgren.getByRole('link', { name: 'Draft' }).click()
  await page.getByTestId('invoice-issue').click()
  await expect(page.getByTestId('invoice-number')).toHaveText(/^INV-\d{4}-\d{4}$/)
  await expect(page.getByTestId('invoice-state')).toHaveText('Open')
  await shot(page, 'invoices-admin-issued')
})

test('the office sets up a programme\'s fees and drafts an invoice with the checked form', async ({ page }) => {
  await page.setViewportSize(PHONE)
  await signInAs(page, ADMIN)
  await page.goto('/admin/fee-schedules')
  await page.getByRole('button', { name: 'Edit fees' }).first().click()
  const form = page.getByTestId('fee-schedule-form')
  await form.getByLabel('Deposit, before tax').fill('2500')
  await form.getByRole('button', { name: 'Save fees' }).click()
  await expect(form.getByText('The deposit cannot be more than the price list total.')).toBeVisible()
  await form.getByLabel('Deposit, before tax').fill('500')
  await expect(page.getByTestId('fee-plan-preview')).toContainText('Instalment 6 of 6')
  await shot(page, 'fees-admin-edit')
  await form.getByRole('button', { name: 'Save fees' }).click()
  await expect(page.getByRole('status')).toContainText('Fees saved')
  await expect(page.getByText(/£500\.00 deposit/)).toBeVisible()

  await page.goto(`/admin/clients/${seedId('client:lindgren')}/invoices`)
  await expect(page.getByTestId('plan-invoices-form')).toBeVisible()
  const draft = page.getByTestId('invoice-draft-form')
  await draft.getByLabel('Item').fill('Extra home visit')
  await draft.getByLabel(/Unit price/).fill('85.555')
  await draft.getByRole('button', { name: 'Save the draft' }).click()
  await expect(draft.getByText(/at most 2 digits after the point/)).toBeVisible()
  await draft.getByLabel(/Unit price/).fill('85')
  await draft.getByLabel('Tax %').fill('20')
  await draft.getByRole('button', { name: 'Save the draft' }).click()
  await expect(page).toHaveURL(/\/admin\/invoices\/[\w-]+$/)
  await expect(page.getByText('£102.00').first()).toBeVisible()
})

