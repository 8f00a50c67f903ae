import { expect, type Page } from '@playwright/test'
import { DEMO_PASSWORD } from '../../scripts/lib/seed-data'

export const PHONE = { width: 390, height: 844 }
// A common laptop screen (1366 × 768 class), the width the office and trainers use most (common practice).
export const DESKTOP = { width: 1366, height: 860 }

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

/** What an idb-keyval store of the page holds: every value, or the one under `key`. */
export async function readIndexedDb<T>(page: Page, database: string, store: string, key?: string): Promise<T> {
  return page.evaluate(({ database, store, key }) => new Promise((ok, fail) => {
    const open = indexedDB.open(database)
    open.onerror = () => fail(open.error)
    open.onupgradeneeded = () => open.result.createObjectStore(store)
    open.onsuccess = () => {
      const db = open.result
      const os = db.transaction(store, 'readonly').objectStore(store)
      const req = key === undefined ? os.getAll() : os.get(key)
      req.onsuccess = () => { ok(req.result); db.close() }
      req.onerror = () => fail(req.error)
    }
  }), { database, store, key }) as Promise<T>
}

/** The records waiting in the phone's outbox (IndexedDB "forescent-outbox", see stores/outbox.ts). */
export function outboxItems(page: Page) {
  return readIndexedDb<{ key: string, label: string, tappedAt: string, url: string, refused?: { message: string } }[]>(page, 'forescent-outbox', 'items')
}

/** Waits until the service worker controls the page (one reload after its first install). */
export async function waitForWorker(page: Page) {
  await page.evaluate(() => navigator.serviceWorker.ready.then(() => true))
  if (!(await page.evaluate(() => !!navigator.serviceWorker.controller))) await page.reload()
  await expect.poll(() => page.evaluate(() => !!navigator.serviceWorker.controller), { timeout: 20_000 }).toBe(true)
}

/**
 * The serious and critical WCAG 2.2 A/AA violations axe-core finds on the page as it is now, one line per rule with
 * up to three of the elements it names. An empty list is a pass (the tour fails on anything else).
 */
export async function accessibilityProblems(page: Page): Promise<string[]> {
  const { default: AxeBuilder } = await import('@axe-core/playwright')
  const result = await new AxeBuilder({ page })
    .withTags(['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa', 'wcag22aa', 'best-practice'])
    .analyze()
  return result.violations
    .filter(v => v.impact === 'serious' || v.impact === 'critical')
    .map(v => `${v.id} (${v.impact}, ${v.nodes.length}×): ${v.nodes.slice(0, 3).map(n => n.target.join(' ')).join(' | ')}`)
}
