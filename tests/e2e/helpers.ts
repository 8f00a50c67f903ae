import { expect, type Page } from '@playwright/test'
import { DEMO_PASSWORD } from '../../scripts/lib/seed-data'

export const PHONE = { width: 390, height: 844 }
export const DESKTOP = { width: 1280, height: 860 }

/** Signs in through the real form. */
export async function signInAs(page: Page, email: string, password = DEMO_PASSWORD) {
  await page.goto('/login')
  await page.getByLabel('E-mail').fill(email)
  await page.getByLabel('Password').fill(password)
  await page.getByRole('button', { name: 'Sign in' }).click()
  await expect(page).not.toHaveURL(/\/login/)
}

export async function signOut(page: Page) {
  const desktopButton = page.locator('aside').getByRole('button', { name: 'Sign out' })
  if (await desktopButton.isVisible()) await desktopButton.click()
  else {
    await page.getByLabel('Account').click()
    await page.getByRole('button', { name: 'Sign out' }).click()
  }
  await expect(page).toHaveURL(/\/login/)
}

export async function shot(page: Page, name: string) {
  if (process.env.E2E_SCREENSHOTS) await page.screenshot({ path: `${process.env.E2E_SCREENSHOTS}/${name}.png`, fullPage: true })
}
