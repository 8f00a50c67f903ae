// A walk through each role's main pages at phone and desktop widths: every page renders its heading without
// browser errors and without a single Content-Security-Policy violation (each one is collected from the page's
// securitypolicyviolation events) and without a serious or critical axe-core accessibility violation. With E2E_SCREENSHOTS=<folder> it also leaves a screenshot of each page to look at.
import { expect, test } from '@playwright/test'
import { ADMIN, CLIENT_A, HANDLER_A, TRAINER_A } from '../support/people'
import { accessibilityProblems, DESKTOP, PHONE, shot, signInAs } from './helpers'
import { seedId } from '../../scripts/lib/seed-data'

const HOMEWORK_ASSIGNMENT_A = seedId('assignment:fairweather:two-controls')
const HOMEWORK_VIDEO_A = seedId('video:fairweather:two-controls:1')

const TOUR: { who: string, email: string, pages: { path: string, heading: RegExp | string }[] }[] = [
  { who: 'admin', email: ADMIN, pages: [
    { path: '/admin', heading: 'Today at the office' },
    { path: '/admin/calendar', heading: 'Calendar' },
    { path: '/admin/messages', heading: 'Messages' },
    { path: `/admin/clients/${CLIENT_A}/messages`, heading: 'Messages' },
    { path: `/admin/appointments/${seedId('appointment:fairweather-weekly:1')}`, heading: 'Appointment' },
    { path: '/admin/clients', heading: 'All clients' },
    { path: '/admin/trainers', heading: 'Trainers' },
    { path: '/admin/settings', heading: 'Policies' },
    { path: '/admin/invoices', heading: 'Invoices' },
    { path: '/admin/fee-schedules', heading: 'Fee schedules' },
    { path: `/admin/clients/${CLIENT_A}/invoices`, heading: 'Invoices' },
    { path: '/admin/programme-templates', heading: 'Programme templates' },
    { path: '/admin/training', heading: 'Training sessions' },
    { path: `/admin/dogs/reliability-${seedId('dog:achterberg')}`, heading: 'measured reliability' },
    { path: '/admin/homework', heading: 'Homework to review' },
  ] },
  { who: 'trainer', email: TRAINER_A, pages: [
    { path: '/trainer', heading: 'Today' },
    { path: '/trainer/roster', heading: 'Your roster' },
    { path: '/trainer/calendar', heading: 'Calendar' },
    { path: `/trainer/appointments/${seedId('appointment:fairweather-weekly:1')}`, heading: 'Appointment' },
    { path: '/trainer/messages', heading: 'Messages' },
    { path: `/trainer/clients/${CLIENT_A}/messages`, heading: 'Messages' },
    { path: '/trainer/account', heading: 'Your account' },
    { path: `/trainer/clients/${CLIENT_A}`, heading: 'Fairweather household' },
    { path: '/trainer/clients/new', heading: 'New client' },
    { path: `/trainer/clients/${CLIENT_A}/samples`, heading: 'Sample bank' },
    { path: `/trainer/clients/${CLIENT_A}/diary`, heading: /diary/i },
    { path: `/trainer/clients/${CLIENT_A}/training`, heading: 'Training and reliability' },
    { path: '/trainer/training', heading: 'Training sessions' },
    { path: `/trainer/dogs/reliability-${seedId('dog:fairweather')}`, heading: 'measured reliability' },
    { path: `/trainer/clients/${CLIENT_A}/homework`, heading: 'Homework' },
    { path: '/trainer/homework', heading: 'Homework to review' },
    { path: '/trainer/homework/exercises', heading: 'Exercise library' },
    { path: `/trainer/homework/videos/${HOMEWORK_VIDEO_A}`, heading: 'Two controls and one target on the floor' },
  ] },
  { who: 'handler', email: HANDLER_A, pages: [
    { path: '/handler', heading: 'Ada Fairweather' },
    { path: '/handler/calendar', heading: 'Your visits' },
    { path: `/handler/messages/${CLIENT_A}`, heading: 'Messages' },
    { path: '/handler/account', heading: 'Your account' },
    { path: `/handler/clients/${CLIENT_A}`, heading: 'Fairweather household' },
    { path: `/handler/samples/${CLIENT_A}`, heading: 'Our samples' },
    { path: `/handler/samples/${CLIENT_A}/collect`, heading: 'Collect a sample' },
    { path: `/handler/diary/${CLIENT_A}`, heading: /diary/i },
    { path: '/handler/invoices', heading: 'Invoices and receipts' },
    { path: `/handler/homework/${CLIENT_A}`, heading: 'Homework' },
    { path: `/handler/homework/assignments/${HOMEWORK_ASSIGNMENT_A}`, heading: 'Two controls and one target on the floor' },
  ] },
]

for (const viewport of [{ name: 'phone', size: PHONE }, { name: 'desktop', size: DESKTOP }]) {
  for (const role of TOUR) {
    test(`${role.who} pages render on a ${viewport.name}`, async ({ page }) => {
      test.setTimeout(360_000) // two dozen pages per role, each scanned by axe, on a shared 2-core machine
      const problems: string[] = []
      let current = '(sign-in)'
      page.on('pageerror', e => problems.push(`${current}: ${e.message}`))
      // Every console error, every answer of 400 or more and every request that failed is a problem (a dog without a
      // photo shows its initial without asking the server). A request cut short by the next navigation is not.
      page.on('console', (m) => { if (m.type() === 'error') problems.push(`${current}: console: ${m.text()}`) })
      page.on('response', (r) => { if (r.status() >= 400) problems.push(`${current}: ${r.status()} ${r.url()}`) })
      page.on('requestfailed', (r) => {
        if (r.failure()?.errorText !== 'net::ERR_ABORTED') problems.push(`${current}: failed ${r.url()} ${r.failure()?.errorText}`)
      })
      // Every CSP violation on any page of the walk (the sign-in page included) is a problem.
      await page.addInitScript(() => {
        const w = window as unknown as { __cspViolations: string[] }
        w.__cspViolations = []
        document.addEventListener('securitypolicyviolation', e => w.__cspViolations.push(`${e.violatedDirective} blocked ${e.blockedURI || '(inline)'} at ${e.sourceFile}:${e.lineNumber}`))
      })
      const cspViolations = async () => page.evaluate(() => (window as unknown as { __cspViolations?: string[] }).__cspViolations ?? [])
      let cspHeader = ''
      page.on('response', (r) => { if (r.request().resourceType() === 'document') cspHeader ||= r.headers()['content-security-policy'] ?? '' })
      await page.setViewportSize(viewport.size)
      await signInAs(page, role.email)
      problems.push(...(await cspViolations()).map(v => `(sign-in): CSP ${v}`))
      for (const p of role.pages) {
        current = p.path
        await page.goto(p.path)
        await expect(page.getByRole('heading', { level: 1 })).toContainText(p.heading)
        await page.waitForLoadState('networkidle')
        problems.push(...(await cspViolations()).map(v => `${p.path}: CSP ${v}`))
        // WCAG 2.2 AA by axe-core: no serious or critical violation on any page.
        problems.push(...(await accessibilityProblems(page)).map(v => `${p.path}: axe ${v}`))
        // Nothing wider than the screen, on a phone or on a 1366-pixel laptop (wide tables scroll inside their card).
        const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth)
        expect(overflow, `${p.path} is wider than the ${viewport.name} screen`).toBeLessThanOrEqual(1)
        const name = p.path.split('/').filter(Boolean).slice(1).map(x => (x.length > 20 ? 'A' : x)).join('-') || 'home'
        await shot(page, `tour-${role.who}-${name}-${viewport.name}`)
      }
      expect(problems).toEqual([])
      // The walk ran under the real policy (nonce-based scripts), not without one.
      expect(cspHeader).toMatch(/script-src 'self' 'strict-dynamic' 'nonce-/)
    })
  }
}
