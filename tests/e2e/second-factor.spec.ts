// A trainer sets up a second factor from the account page (QR code, key, first code, recovery codes), signs out,
// and signs back in with the password and then a code from the app; a wrong code gets a clear message.
import { expect, test } from '@playwright/test'
import { DEMO_PASSWORD } from '../../scripts/lib/seed-data'
import { totpCode } from '../../shared/utils/second-factor'
import { signInAs, signOut } from './helpers'

// Demo trainer 3 (scripts/lib/seed-data.ts): no other browser test signs in as them.
const TRAINER_3 = 'ines.okoro@larkspur.test'

test('a trainer sets up a second factor and then signs in with a code from the app', async ({ page }) => {
  await signInAs(page, TRAINER_3)
  await page.goto('/trainer/account')
  await page.getByRole('button', { name: 'Set up a second factor' }).click()
  await expect(page.getByRole('img', { name: /QR code/ })).toBeVisible()
  const secret = (await page.locator('code').first().textContent())!.trim()
  await page.getByLabel('Code from the app').fill('000000')
  await page.getByRole('button', { name: 'Turn on' }).click()
  await expect(page.getByText('That code does not match').first()).toBeVisible()
  await page.getByLabel('Code from the app').fill(totpCode(secret, Date.now()))
  await page.getByRole('button', { name: 'Turn on' }).click()
  await expect(page.getByTestId('recovery-codes').locator('li')).toHaveCount(10)
  await page.getByRole('button', { name: 'I have kept them' }).click()
  await expect(page.getByText(/Recovery codes left: 10/)).toBeVisible()
  await signOut(page)

  await page.getByLabel('E-mail').fill(TRAINER_3)
  await page.getByLabel('Password').fill(DEMO_PASSWORD)
  await page.getByRole('button', { name: 'Sign in' }).click()
  const codeField = page.getByLabel('Code from your authenticator app')
  await expect(codeField).toBeVisible()
  await codeField.fill('000000')
  await page.getByRole('button', { name: 'Sign in' }).click()
  await expect(page.getByText('That code does not match').first()).toBeVisible()
  await expect(page).toHaveURL(/\/login/)
  // The code of the next step: the one used to turn it on cannot be used again.
  await codeField.fill(totpCode(secret, Date.now() + 30_000))
  await page.getByRole('button', { name: 'Sign in' }).click()
  await expect(page).toHaveURL(/\/trainer/)
  await expect(page.getByRole('heading', { level: 1 })).toContainText('Today')
})
