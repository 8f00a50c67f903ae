import { expect, test } from '@playwright/test'
import { ADMIN, CLIENT_A, CLIENT_B, HANDLER_A, HANDLER_B, TRAINER_A, TRAINER_B } from '../support/people'
import { DESKTOP, PHONE, shot, signInAs, signOut } from './helpers'

const ROLES = [
  { who: 'admin', email: ADMIN, area: /\/admin$/, heading: 'Today at the office', foreign: null },
  { who: 'trainer', email: TRAINER_A, area: /\/trainer$/, heading: 'Today', foreign: `/trainer/clients/${CLIENT_B}` },
  { who: 'trainer2', email: TRAINER_B, area: /\/trainer$/, heading: 'Today', foreign: `/trainer/clients/${CLIENT_A}` },
  { who: 'handler', email: HANDLER_A, area: /\/handler$/, heading: 'Ada Fairweather', foreign: `/handler/clients/${CLIENT_B}` },
  { who: 'handler2', email: HANDLER_B, area: /\/handler$/, heading: 'Ruth Achterberg', foreign: `/handler/clients/${CLIENT_A}` },
]

for (const viewport of [{ name: 'phone', size: PHONE }, { name: 'desktop', size: DESKTOP }]) {
  test.describe(`signing in on a ${viewport.name}`, () => {
    test.use({ viewport: viewport.size })
    for (const r of ROLES) {
      test(`${r.who} lands in their own area and cannot open another household`, async ({ page }) => {
        await signInAs(page, r.email)
        await expect(page).toHaveURL(r.area)
        await expect(page.getByRole('heading', { level: 1 })).toContainText(r.heading)
        await shot(page, `${r.who}-home-${viewport.name}`)
        if (r.foreign) {
          await page.goto(r.foreign)
          await expect(page.getByText('Nothing here')).toBeVisible()
        }
        // Another role's area sends them back home.
        await page.goto(r.who === 'admin' ? '/trainer' : '/admin')
        await expect(page).toHaveURL(r.area)
        await signOut(page)
        await page.goto('/')
        await expect(page).toHaveURL(/\/login/)
      })
    }
  })
}

test('a wrong password shows a clear message and stays on the form', async ({ page }) => {
  await page.goto('/login')
  await page.getByLabel('E-mail').fill(TRAINER_A)
  await page.getByLabel('Password').fill('not-the-password')
  await page.getByRole('button', { name: 'Sign in' }).click()
  await expect(page.getByRole('alert')).toContainText('do not match an active account')
  await expect(page).toHaveURL(/\/login/)
})

test('the form shows field errors from the shared schema before sending', async ({ page }) => {
  await page.goto('/login')
  await page.getByLabel('E-mail').fill('not-an-email')
  await page.getByRole('button', { name: 'Sign in' }).click()
  await expect(page.getByText('Enter a valid e-mail address')).toBeVisible()
  await expect(page.getByText('Enter your password.')).toBeVisible()
})

test('the trainer sees their client file and the handler theirs', async ({ page }) => {
  await signInAs(page, TRAINER_A)
  await page.goto('/trainer/roster') // the trainer lands on Today; the roster is one tap away
  await page.getByRole('link', { name: /Fairweather household/ }).click()
  await expect(page.getByTestId('client-title')).toHaveText('Fairweather household')
  await expect(page.getByTestId('client-dogs').getByText('Juniper', { exact: true })).toBeVisible()
  await shot(page, 'trainer-client-file-desktop')
  await signOut(page)
  await page.setViewportSize(PHONE)
  await signInAs(page, HANDLER_A)
  await page.getByRole('link', { name: /Migraine · Fairweather household/ }).click()
  await expect(page.getByTestId('client-title')).toHaveText('Fairweather household')
  await shot(page, 'handler-client-file-phone')
})
