// Light and dark: the app follows the phone's setting (prefers-color-scheme) unless the person chose one on this
// device, and the main screens keep enough contrast in both (axe-core's color-contrast rule: WCAG 2 AA, 4.5:1 for
// text, 3:1 for large text).
import AxeBuilder from '@axe-core/playwright'
import { expect, test, type Page } from '@playwright/test'
import { CLIENT_A, HANDLER_A, TRAINER_A } from '../support/people'
import { seedId } from '../../scripts/lib/seed-data'
import { PHONE, shot, signInAs } from './helpers'

const HOUSEHOLD = [
  '/handler',
  `/handler/diary/${CLIENT_A}`,
  `/handler/samples/${CLIENT_A}`,
  `/handler/samples/${CLIENT_A}/collect`,
  `/handler/samples/${CLIENT_A}/${seedId('sample:fairweather:8')}`,
  `/handler/homework/${CLIENT_A}`,
  `/handler/homework/assignments/${seedId('assignment:fairweather:two-controls')}`,
  `/handler/messages/${CLIENT_A}`,
  '/handler/calendar',
  '/handler/invoices',
  '/handler/account',
]
const TRAINER = ['/trainer', '/trainer/roster', `/trainer/clients/${CLIENT_A}`, `/trainer/clients/${CLIENT_A}/training`, `/trainer/clients/${CLIENT_A}/samples`]

/** Contrast problems on the page as axe-core finds them, one line each. */
async function contrastProblems(page: Page, path: string): Promise<string[]> {
  const result = await new AxeBuilder({ page }).withRules(['color-contrast']).analyze()
  return result.violations.flatMap(v => v.nodes.map(n => `${path}: ${n.target.join(' ')} ${n.any[0]?.message ?? v.help}`))
}

async function walk(page: Page, paths: string[], dark: boolean, label: string) {
  const problems: string[] = []
  for (const path of paths) {
    await page.goto(path)
    await expect(page.locator('main')).toBeVisible()
    expect(await page.evaluate(() => document.documentElement.classList.contains('dark')), path).toBe(dark)
    await page.waitForLoadState('networkidle')
    problems.push(...await contrastProblems(page, path))
    await shot(page, `${label}-${path.replace(/\W+/g, '-')}`)
  }
  expect(problems).toEqual([])
}

for (const scheme of ['light', 'dark'] as const) {
  test.describe(`the phone set to ${scheme}`, () => {
    test.use({ colorScheme: scheme })
    test(`the household's main screens are legible in ${scheme}`, async ({ page }) => {
      test.setTimeout(120_000)
      await page.setViewportSize(PHONE)
      await signInAs(page, HANDLER_A)
      await walk(page, HOUSEHOLD, scheme === 'dark', `appearance-${scheme}-handler`)
    })
    test(`the trainer's main screens are legible in ${scheme}`, async ({ page }) => {
      test.setTimeout(120_000)
      await signInAs(page, TRAINER_A)
      await walk(page, TRAINER, scheme === 'dark', `appearance-${scheme}-trainer`)
    })
  })
}

test.describe('the switch', () => {
  test.use({ colorScheme: 'light' })
  test('dark chosen by hand stays on this device over the phone setting, and "follow the phone" follows it again', async ({ page }) => {
    await page.setViewportSize(PHONE)
    await signInAs(page, HANDLER_A)
    await page.goto('/handler/account')
    const dark = () => page.evaluate(() => document.documentElement.classList.contains('dark'))
    expect(await dark()).toBe(false)
    await page.getByTestId('appearance-dark').check()
    expect(await dark()).toBe(true)
    await page.reload()
    await expect(page.getByTestId('appearance-dark')).toBeChecked()
    expect(await dark()).toBe(true) // before any script of the app: no light flash
    await page.goto(`/handler/diary/${CLIENT_A}`)
    expect(await dark()).toBe(true)
    await page.goto('/handler/account')
    await page.getByTestId('appearance-system').check()
    expect(await dark()).toBe(false)
    await page.emulateMedia({ colorScheme: 'dark' })
    await expect.poll(dark).toBe(true) // the phone switched to dark: so does the app
    await page.getByTestId('appearance-light').check()
    expect(await dark()).toBe(false)
    await shot(page, 'appearance-switch-phone')
  })
})
