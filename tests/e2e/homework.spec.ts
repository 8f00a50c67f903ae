import { resolve } from 'node:path'
import { expect, test, type Page } from '@playwright/test'
import { seedId } from '../../scripts/lib/seed-data'
import { linkIn, waitForMail } from '../support/http'
import { CLIENT_A, HANDLER_A, TRAINER_A } from '../support/people'
import { resetDatabase } from '../support/stack'
import { DESKTOP, PHONE, shot as fullShot, signInAs, signOut } from './helpers'

async function shot(page: Page, name: string) {
  await fullShot(page, name)
  if (process.env.E2E_SCREENSHOTS) await page.screenshot({ path: `${process.env.E2E_SCREENSHOTS}/${name}-screen.png` })
}

// These tests send and review videos: start from, and leave behind, the plain demo.
test.beforeEach(async () => {
  await resetDatabase(process.env.E2E_DATABASE_URL!)
  // Each test waits for its own review e-mail: empty the fake inbox first.
  await fetch(`${process.env.E2E_MAIL_URL}/api/messages`, { method: 'DELETE' })
})
test.afterAll(async () => { await resetDatabase(process.env.E2E_DATABASE_URL!) })

// The committed 3-second sample (tests/fixtures/README.md).
const SAMPLE = resolve(import.meta.dirname, '../fixtures/sample-3s.webm')
const ASSIGNMENT = seedId('assignment:fairweather:two-controls')

test('on a phone, the handler sends a video with a progress bar, pauses and resumes; the trainer comments at a moment and approves; the handler is e-mailed', async ({ page, context }) => {
  test.setTimeout(90_000)
  await page.setViewportSize(PHONE)
  await signInAs(page, HANDLER_A)
  await page.getByTestId('handler-homework-button').click()
  await expect(page).toHaveURL(new RegExp(`/handler/homework/${CLIENT_A}`))
  await expect(page.getByTestId('homework-caution')).toContainText('never replaces it')
  await page.getByTestId('handler-assignment').filter({ hasText: 'Two controls and one target on the floor' }).click()
  await expect(page.getByTestId('assignment-title')).toHaveText('Two controls and one target on the floor')
  await shot(page, 'homework-handler-assignment-phone')

  // A slow line (about 8 KB/s up), so the upload takes seconds: the bar, speed and pause are there to see and use.
  const cdp = await context.newCDPSession(page)
  await cdp.send('Network.enable')
  await cdp.send('Network.emulateNetworkConditions', { offline: false, latency: 40, downloadThroughput: 1_000_000, uploadThroughput: 8_000 })
  await page.getByTestId('upload-file').setInputFiles(SAMPLE)
  const bar = page.getByTestId('upload-progress')
  await expect(bar).toBeVisible()
  await expect(page.getByTestId('upload-speed')).toBeVisible()
  await shot(page, 'homework-handler-uploading-phone')
  await page.getByTestId('upload-pause').click()
  await expect(page.getByTestId('upload-resume')).toBeVisible()
  const pausedAt = Number(await bar.getAttribute('aria-valuenow'))
  expect(pausedAt).toBeLessThan(100)
  await cdp.send('Network.emulateNetworkConditions', { offline: false, latency: 0, downloadThroughput: -1, uploadThroughput: -1 })
  await page.getByTestId('upload-resume').click()
  await expect(page.getByTestId('upload-done')).toBeVisible({ timeout: 20_000 })
  await expect(bar).toHaveAttribute('aria-valuenow', '100')
  await expect(page.getByTestId('upload-percent')).toHaveText('100%')
  // The list of videos sent shows it, waiting for the trainer.
  await expect(page.getByTestId('sent-video-state').last()).toHaveText('Waiting for your trainer')
  await shot(page, 'homework-handler-sent-phone')
  await signOut(page)

  // The trainer finds it in the queue (the newest waiting video: sent today).
  await signInAs(page, TRAINER_A)
  await page.goto('/trainer/homework')
  const card = page.getByTestId('queue-cards').getByRole('link').filter({ hasText: 'Sent today' })
  await expect(card).toHaveCount(1)
  await shot(page, 'homework-queue-phone')
  await card.click()
  await expect(page.getByTestId('video-title')).toHaveText('Two controls and one target on the floor')
  const video = page.getByTestId('homework-video')
  // Wait until the browser has read the video (through the Range route), then go to 0:01.
  await expect.poll(() => video.evaluate((v: HTMLVideoElement) => v.readyState)).toBeGreaterThanOrEqual(1)
  await video.evaluate((v: HTMLVideoElement) => { v.currentTime = 1.6 })
  await expect(page.getByTestId('comment-at')).toHaveText('Comment at 0:01')
  await page.getByTestId('comment-at').click()
  await page.getByTestId('comment-body').fill('Here: a clean nose touch on the target tin.')
  await page.getByTestId('comment-save').click()
  const comments = page.getByTestId('comment-list')
  await expect(comments).toContainText('0:01')
  await expect(comments).toContainText('a clean nose touch')
  // Clicking the comment's time jumps the video there.
  await video.evaluate((v: HTMLVideoElement) => { v.pause(); v.currentTime = 0 })
  await page.getByTestId('comment-seek').first().click()
  await expect.poll(() => video.evaluate((v: HTMLVideoElement) => Math.floor(v.currentTime))).toBeGreaterThanOrEqual(1)
  await page.getByLabel('Notes for the household (optional)').fill('Well set up: the helper swapped the tins each time.')
  await shot(page, 'homework-review-phone')
  await page.getByTestId('review-submit').click()
  await expect(page.getByTestId('review-result')).toContainText('Approved')

  // The household's e-mail: the outcome, the timed comment, and a link to the video page.
  const mail = await waitForMail(process.env.E2E_MAIL_URL!, HANDLER_A, 'Homework approved')
  expect(mail.text).toContain('at 0:01: Here: a clean nose touch on the target tin.')
  const link = new URL(linkIn(mail.text, '/handler/homework/videos/'))
  await signOut(page)
  await signInAs(page, HANDLER_A)
  await page.goto(link.pathname)
  await expect(page.getByTestId('review-result')).toContainText('Approved')
  await expect(page.getByTestId('comment-list')).toContainText('a clean nose touch')
  await page.goto(`/handler/homework/assignments/${ASSIGNMENT}`)
  await expect(page.getByText('This homework is done')).toBeVisible()
})

test('a file that is not a video is refused with a message before anything is sent', async ({ page }) => {
  await page.setViewportSize(PHONE)
  await signInAs(page, HANDLER_A)
  await page.goto(`/handler/homework/assignments/${ASSIGNMENT}`)
  await page.getByTestId('upload-file').setInputFiles({ name: 'notes.txt', mimeType: 'text/plain', buffer: Buffer.from('not a video') })
  await expect(page.getByRole('alert')).toContainText('not a video')
  await expect(page.getByTestId('upload-progress')).toHaveCount(0)
})

test('the queue, the review page and the upload page look right on a desktop', async ({ page }) => {
  await page.setViewportSize(DESKTOP)
  await signInAs(page, TRAINER_A)
  await page.goto('/trainer/homework')
  await expect(page.getByTestId('queue-table')).toContainText('Fairweather household')
  await shot(page, 'homework-queue-desktop')
  await page.getByTestId('queue-table').getByRole('link', { name: 'Review' }).first().click()
  await expect(page.getByTestId('review-form')).toBeVisible()
  await shot(page, 'homework-review-desktop')
  await page.goto(`/trainer/clients/${CLIENT_A}/homework`)
  await expect(page.getByTestId('assignment')).toHaveCount(2)
  await shot(page, 'homework-client-desktop')
  // Set homework from the library: the exercise fills in the text, the due date defaults to a week ahead.
  await page.getByTestId('set-homework').click()
  const form = page.getByTestId('assignment-form')
  await form.getByLabel('Start from').selectOption({ label: 'Blind line-up set by a helper' })
  await expect(form.getByLabel('Title')).toHaveValue('Blind line-up set by a helper')
  await shot(page, 'homework-set-desktop')
  await form.getByRole('button', { name: 'Set the homework' }).click()
  await expect(page.getByTestId('assignment')).toHaveCount(3)
  await expect(page.getByTestId('assignment').filter({ hasText: 'Blind line-up set by a helper' })).toContainText('Due in 7 days')
  await page.goto('/trainer/homework/exercises')
  await expect(page.getByTestId('exercise')).toHaveCount(4)
  await shot(page, 'homework-exercises-desktop')
  await signOut(page)
  await signInAs(page, HANDLER_A)
  await page.goto(`/handler/homework/assignments/${ASSIGNMENT}`)
  await expect(page.getByTestId('video-upload')).toBeVisible()
  await shot(page, 'homework-handler-assignment-desktop')
})

test('on a phone, an upload carries on after the page is reloaded and after the signal drops', async ({ page, context }) => {
  test.setTimeout(90_000)
  await page.setViewportSize(PHONE)
  await signInAs(page, HANDLER_A)
  await page.goto(`/handler/homework/assignments/${seedId('assignment:fairweather:kitchen')}`)
  const cdp = await context.newCDPSession(page)
  await cdp.send('Network.enable')
  const slow = { offline: false, latency: 40, downloadThroughput: 1_000_000, uploadThroughput: 8_000 }
  await cdp.send('Network.emulateNetworkConditions', slow)
  await page.getByTestId('upload-file').setInputFiles(SAMPLE)
  await expect(page.getByTestId('upload-speed')).toBeVisible()
  await page.getByTestId('upload-pause').click()
  await expect(page.getByTestId('upload-resume')).toBeVisible()

  // The phone reloads the page (the tab was closed) before the upload finished: the page remembers it.
  await page.reload()
  await expect(page.getByTestId('upload-stopped')).toContainText('sample-3s.webm')

  // No signal now: choosing the same video again picks the earlier upload up, and waits for the signal.
  await cdp.send('Network.emulateNetworkConditions', { ...slow, offline: true })
  await page.getByTestId('upload-file').setInputFiles(SAMPLE)
  await expect(page.getByText('Carrying on from an earlier attempt.')).toBeVisible()
  await expect(page.getByTestId('upload-offline')).toContainText('carries on by itself when the signal is back')
  await shot(page, 'homework-handler-offline-phone')

  // The signal is back: it finishes by itself, as one video.
  await cdp.send('Network.emulateNetworkConditions', { offline: false, latency: 0, downloadThroughput: -1, uploadThroughput: -1 })
  await expect(page.getByTestId('upload-done')).toBeVisible({ timeout: 30_000 })
  await expect(page.getByTestId('upload-offline')).toHaveCount(0)
  await expect(page.getByTestId('sent-video')).toHaveCount(1)
})
