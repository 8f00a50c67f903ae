// Money a business can stand behind, told as one story: the office sets up its identity (a wrong IBAN refused first),
// copies its programme into a second template and prices it, the trainer starts that programme for a household after
// seeing what it will invoice, and the household pays the deposit by card and gets a receipt with its PDF.
import { expect, test } from '@playwright/test'
import { seedId } from '../../scripts/lib/seed-data'
import { waitForMail } from '../support/http'
import { ADMIN, TRAINER_B } from '../support/people'
import { resetDatabase } from '../support/stack'
import { DESKTOP, PHONE, shot, signInAs, signOut } from './helpers'

const BRENNAN = seedId('client:brennan') // trainer B's household at intake: no programme, no invoices
const BRENNAN_HANDLER = 'orla.brennan@example.test'

test.beforeEach(async () => { await resetDatabase(process.env.E2E_DATABASE_URL!) })
test.afterAll(async () => { await resetDatabase(process.env.E2E_DATABASE_URL!) })

test('the office sets up its identity and a second programme; the trainer starts it; the household pays and gets a receipt', async ({ page }) => {
  test.setTimeout(120_000)
  await page.setViewportSize(DESKTOP)
  await signInAs(page, ADMIN)

  // The business identity: a wrong IBAN is refused with its reason, a right one saved.
  await page.goto('/admin/settings')
  const identity = page.getByTestId('setting-business-identity')
  await identity.getByLabel('Legal name').fill('Larkspur Scent Partners Ltd')
  await identity.getByLabel('IBAN').fill('GB82 WEST 1234 5698 7654 31')
  await identity.getByRole('button', { name: 'Save' }).click()
  await expect(identity.getByText('This IBAN is not valid')).toBeVisible()
  await identity.getByLabel('IBAN').fill('GB82 WEST 1234 5698 7654 32')
  await identity.getByRole('button', { name: 'Save' }).click()
  await expect(identity.getByText('Saved.')).toBeVisible()
  await shot(page, 'money-identity')

  // A second programme: a copy of the standard one, renamed, with its own deposit.
  await page.goto('/admin/programme-templates')
  await page.getByTestId(/^template-/).first().getByRole('button', { name: 'Duplicate' }).click()
  await expect(page.getByRole('status')).toContainText('copied with its milestones and fees')
  const copy = page.locator('section', { has: page.getByRole('heading', { name: /\(copy\)$/ }) })
  await copy.getByRole('button', { name: 'Edit or rename' }).click()
  await page.getByLabel('Template name').fill('Night-time alert programme')
  await page.getByRole('button', { name: 'Save template' }).click()
  await expect(page.getByRole('heading', { name: 'Night-time alert programme' })).toBeVisible()
  await page.goto('/admin/fee-schedules')
  const fees = page.locator('section', { has: page.getByRole('heading', { name: 'Night-time alert programme' }) })
  await fees.getByRole('button', { name: 'Edit fees' }).click()
  await fees.getByLabel('Deposit, before tax').fill('300')
  await fees.getByRole('button', { name: 'Save fees' }).click()
  await expect(page.getByRole('status')).toContainText('Fees saved')
  await expect(fees.getByText(/£300\.00 deposit/)).toBeVisible()
  await signOut(page)

  // The trainer chooses it for Brennan, sees what will be invoiced and e-mailed, and starts it.
  await page.setViewportSize(PHONE)
  await signInAs(page, TRAINER_B)
  await page.goto(`/trainer/clients/${BRENNAN}/training`)
  await page.getByTestId('template-select').selectOption({ label: 'Night-time alert programme' })
  const preview = page.getByTestId('billing-preview')
  // £300 + 20 % VAT (the seeded schedule's rate) = £360.00, issued today.
  await expect(preview.getByTestId('billing-now')).toContainText('£360.00, issued and e-mailed today to orla.brennan@example.test')
  await expect(preview.getByTestId('billing-later')).toContainText('6 instalments')
  await expect(preview.getByTestId('start-programme-no-billing')).toBeVisible()
  await shot(page, 'money-billing-preview')
  await preview.getByTestId('start-programme').click()
  await expect(page.getByTestId('milestone-0')).toBeVisible()

  // The printable training report: the business's letterhead, the household, the trainer and the period; printed
  // without the app's navigation.
  await page.goto(`/trainer/clients/${BRENNAN}/training-report`)
  await expect(page.getByTestId('report-letterhead')).toContainText('Larkspur Scent Partners')
  await expect(page.getByTestId('report-facts')).toContainText('Brennan household')
  await expect(page.getByTestId('report-facts')).toContainText('Fennel')
  await expect(page.getByTestId('report-facts')).toContainText('Trainer:')
  await page.emulateMedia({ media: 'print' })
  await expect(page.getByRole('navigation', { name: 'Main' })).toBeHidden()
  await shot(page, 'money-training-report-print')
  await page.emulateMedia({ media: 'screen' })
  await signOut(page)

  // The household pays the deposit by card and gets a receipt with its PDF.
  await signInAs(page, BRENNAN_HANDLER)
  await page.goto('/handler/invoices')
  await page.getByTestId('invoice-card').first().click()
  await expect(page.getByTestId('invoice-balance')).toHaveText('£360.00')
  await page.getByTestId('invoice-pay').click()
  await expect(page.getByRole('heading', { name: 'Pay £360.00' })).toBeVisible()
  await page.getByLabel('Card number').fill('4242 4242 4242 4242')
  await page.getByRole('button', { name: /^Pay/ }).click()
  await expect(page).toHaveURL(/\/handler\/invoices\/[^?]+\?paid=1/)
  await expect(page.getByTestId('invoice-state')).toHaveText('Paid', { timeout: 15_000 })
  const receiptLink = page.getByTestId(/^receipt-R-INV-/)
  await expect(receiptLink).toBeVisible()
  // The household sees a plain receipt number, never the card provider's id.
  await expect(page.getByTestId('invoice-payments')).not.toContainText('pi_')
  await shot(page, 'money-handler-receipt')
  const download = page.waitForEvent('download')
  await receiptLink.click()
  expect((await download).suggestedFilename()).toMatch(/^R-INV-\d{4}-\d{4}-1\.pdf$/)
  const mail = await waitForMail(process.env.E2E_MAIL_URL!, BRENNAN_HANDLER, 'Receipt for £360.00') as { text: string, attachments?: Array<{ contentType: string }> }
  expect(mail.text).toContain('Your receipt number is R-INV-')
  expect(mail.attachments?.[0]?.contentType).toBe('application/pdf')
})
