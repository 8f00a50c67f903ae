import { expect, test } from '@playwright/test'
import { CLIENT_A, HANDLER_A, HANDLER_B, TRAINER_A } from '../support/people'
import { minimalPdf } from '../support/files'
import { DESKTOP, PHONE, shot, signInAs, signOut } from './helpers'

const TITLE = 'Letter from Dr Ørsted' // invented

test('the trainer uploads a document, the household downloads it, another household cannot open it', async ({ page }) => {
  await page.setViewportSize(DESKTOP)
  await signInAs(page, TRAINER_A)
  await page.goto('/trainer/roster') // the trainer lands on Today; the roster is one tap away
  await page.getByRole('link', { name: /Fairweather household/ }).click()
  await expect(page.getByTestId('client-title')).toHaveText('Fairweather household')
  const docs = page.getByTestId('client-documents')
  await expect(docs.getByText('No documents yet')).toBeVisible()
  await docs.scrollIntoViewIfNeeded()
  await shot(page, 'documents-empty-desktop')

  // A text file named .pdf is refused by its bytes, with the server's message shown.
  await docs.getByRole('button', { name: 'Upload', exact: true }).click()
  await docs.getByLabel('File').setInputFiles({ name: 'notes.pdf', mimeType: 'application/pdf', buffer: Buffer.from('Only some typed notes.\n') })
  await docs.getByLabel('Kind').selectOption('clinician-letter')
  await docs.getByRole('button', { name: 'Upload document' }).click()
  await expect(docs.getByRole('alert').filter({ hasText: 'whatever its name says' })).toBeVisible()
  await shot(page, 'documents-refused-desktop')

  // The kind is required before anything is sent (a fresh form starts without one).
  await docs.getByRole('button', { name: 'Cancel' }).click()
  await docs.getByRole('button', { name: 'Upload', exact: true }).click()
  await docs.getByLabel('File').setInputFiles({ name: 'clinic-letter.pdf', mimeType: 'application/pdf', buffer: Buffer.from(minimalPdf('A letter from the clinic (invented).')) })
  await docs.getByRole('button', { name: 'Upload document' }).click()
  await expect(docs.getByText('Choose what kind of document this is.')).toBeVisible()

  await docs.getByLabel('Kind').selectOption('clinician-letter')
  await docs.getByLabel('Title').fill(TITLE)
  await shot(page, 'documents-upload-form-desktop')
  await docs.getByRole('button', { name: 'Upload document' }).click()
  const link = docs.getByRole('link', { name: `Download ${TITLE}` })
  await expect(link).toBeVisible()
  await expect(docs.getByText(`“${TITLE}” was added to the file.`)).toBeVisible()
  const list = docs.getByRole('list', { name: 'Documents' })
  await expect(list.getByText('Clinician\'s letter', { exact: true })).toBeVisible()
  await expect(list.getByText('Maren Holt')).toBeVisible()
  const href = await link.getAttribute('href')
  expect(href).toMatch(/^\/api\/documents\/[0-9a-f-]{36}$/)
  await shot(page, 'documents-listed-desktop')

  // Rename inline, then ask to delete and keep it.
  await docs.getByRole('button', { name: 'Rename' }).click()
  const rename = docs.getByRole('form', { name: `Rename ${TITLE}` })
  await rename.getByLabel('Title').fill('')
  await rename.getByRole('button', { name: 'Save' }).click()
  await expect(rename.getByText('Give the document a title.')).toBeVisible()
  await shot(page, 'documents-rename-desktop')
  await rename.getByLabel('Title').fill(`${TITLE} (spring)`)
  await rename.getByRole('button', { name: 'Save' }).click()
  await expect(docs.getByRole('link', { name: `Download ${TITLE} (spring)` })).toBeVisible()
  await docs.getByRole('button', { name: 'Delete', exact: true }).click()
  await expect(docs.getByRole('alertdialog')).toContainText('cannot be undone')
  await shot(page, 'documents-confirm-delete-desktop')
  await docs.getByRole('button', { name: 'Keep it' }).click()
  await expect(docs.getByRole('alertdialog')).toHaveCount(0)
  await signOut(page)

  // The handler, on a phone, sees it on their file and downloads it; no rename or delete for them.
  await page.setViewportSize(PHONE)
  await signInAs(page, HANDLER_A)
  await page.getByRole('link', { name: /Migraine · Fairweather household/ }).click()
  await expect(page.getByTestId('client-title')).toHaveText('Fairweather household')
  const hdocs = page.getByTestId('client-documents')
  await expect(hdocs.getByRole('link', { name: `Download ${TITLE} (spring)` })).toBeVisible()
  await expect(hdocs.getByRole('button', { name: 'Rename' })).toHaveCount(0)
  await expect(hdocs.getByRole('button', { name: 'Delete', exact: true })).toHaveCount(0)
  await hdocs.scrollIntoViewIfNeeded()
  await shot(page, 'documents-handler-phone')
  const [download] = await Promise.all([
    page.waitForEvent('download'),
    hdocs.getByRole('link', { name: 'Download', exact: true }).click(),
  ])
  expect(download.suggestedFilename()).toBe(`${TITLE} (spring).pdf`)
  const path = await download.path()
  const { readFileSync } = await import('node:fs')
  expect(readFileSync(path).subarray(0, 8).toString('latin1')).toBe('%PDF-1.4')

  // The handler may upload too (e.g. a vaccination record); the form fits the phone.
  await hdocs.getByRole('button', { name: 'Upload', exact: true }).click()
  await hdocs.getByLabel('Kind').selectOption('vaccination-record')
  await shot(page, 'documents-handler-upload-phone')
  await hdocs.getByRole('button', { name: 'Cancel' }).click()
  await signOut(page)

  // Another household: the document's address and the Fairweather file are "not found".
  await signInAs(page, HANDLER_B)
  const res = await page.goto(href!)
  expect(res?.status()).toBe(404)
  await page.goto(`/handler/clients/${CLIENT_A}`)
  await expect(page.getByText('Nothing here')).toBeVisible()
  await shot(page, 'documents-other-household-phone')
})

test('the documents panel shows its loading and error states and recovers on "Try again"', async ({ page }) => {
  await page.setViewportSize(PHONE)
  await signInAs(page, TRAINER_A)
  await page.goto('/trainer/roster') // the trainer lands on Today; the roster is one tap away
  // The roster link navigates in the browser, so the panel's request can be held back or refused here.
  let release: () => void = () => {}
  const held = new Promise<void>((r) => { release = r })
  await page.route('**/api/clients/*/documents', async (route) => {
    await held
    await route.fulfill({ status: 503, contentType: 'application/json', body: JSON.stringify({ statusCode: 503, message: 'Documents are unavailable for a moment. Try again shortly.' }) })
  })
  await page.getByRole('link', { name: /Fairweather household/ }).click()
  const docs = page.getByTestId('client-documents')
  await expect(docs.getByRole('list', { name: 'Loading documents' })).toBeVisible()
  await docs.scrollIntoViewIfNeeded()
  await shot(page, 'documents-loading-phone')
  release()
  await expect(docs.getByRole('alert')).toContainText('Documents are unavailable for a moment.')
  await shot(page, 'documents-error-phone')
  await page.unroute('**/api/clients/*/documents')
  await docs.getByRole('button', { name: 'Try again' }).click()
  await expect(docs.getByRole('alert')).toHaveCount(0)
  await expect(docs.getByRole('list', { name: 'Documents' }).or(docs.getByText('No documents yet'))).toBeVisible()
})
