// Documents on a client file and the dog's photo, against the built server, its SQLite file and its FILES_DIR.
import { existsSync, readdirSync, readFileSync } from 'node:fs'
import { resolve } from 'node:path'
import { createClient } from '@libsql/client'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { seedId } from '../../scripts/lib/seed-data'
import { Agent, signIn } from '../support/http'
import { ADMIN, CLIENT_A, CLIENT_B, HANDLER_A, HANDLER_B, TRAINER_A, TRAINER_B } from '../support/people'
import { filesDirFor, resetDatabase } from '../support/stack'
import { DOCUMENT_MAX_BYTES, DOG_PHOTO_MAX_BYTES } from '../../shared/utils/documents'
import { minimalPdf, tinyHeic, tinyPng } from '../support/files'

const baseUrl = inject('baseUrl')
const databaseUrl = inject('databaseUrl')
const filesDir = filesDirFor(databaseUrl)
const DOG_A = seedId('dog:fairweather')
const DOG_A2 = seedId('dog:lindgren') // trainer A's other household: no photo
const db = createClient({ url: databaseUrl })

/** Every file under FILES_DIR, temporary ones included. */
function storedFiles(): string[] {
  if (!existsSync(filesDir)) return []
  return readdirSync(filesDir, { recursive: true, withFileTypes: true }).filter(d => d.isFile()).map(d => resolve(d.parentPath, d.name))
}
async function documentCount(): Promise<number> {
  return Number((await db.execute('SELECT count(*) AS n FROM documents')).rows[0]!.n)
}
function form(fields: Record<string, string>, file?: { bytes: Uint8Array<ArrayBuffer>, name: string, type?: string }) {
  const f = new FormData()
  for (const [k, v] of Object.entries(fields)) f.append(k, v)
  if (file) f.append('file', new Blob([file.bytes], { type: file.type ?? 'application/octet-stream' }), file.name)
  return f
}

const TITLE = 'Brief von Dr. Jürgen "Jo" Weiß' // invented
let trainer: Agent, handler: Agent, handlerB: Agent, trainerB: Agent, admin: Agent

beforeAll(async () => {
  await resetDatabase(databaseUrl)
  const agents = await Promise.all([TRAINER_A, HANDLER_A, HANDLER_B, TRAINER_B, ADMIN].map(e => signIn(baseUrl, e)))
  ;[trainer, handler, handlerB, trainerB, admin] = agents as [Agent, Agent, Agent, Agent, Agent]
})
afterAll(() => db.close())

describe('documents on a client file', () => {
  const pdf = minimalPdf('Clinician letter for the Fairweather household (invented).')
  let docId = ''

  it('the trainer uploads a PDF: stored under FILES_DIR, recorded, audited', async () => {
    const res = await trainer.request('POST', `/api/clients/${CLIENT_A}/documents`, form({ kind: 'clinician-letter', title: TITLE }, { bytes: pdf, name: 'letter.pdf', type: 'application/pdf' }))
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    expect(res.body).toMatchObject({ clientId: CLIENT_A, kind: 'clinician-letter', title: TITLE, originalName: 'letter.pdf', contentType: 'application/pdf', sizeBytes: pdf.length, uploadedBy: { name: 'Maren Holt' } })
    expect(res.body.storageKey).toBeUndefined()
    docId = res.body.id
    const onDisk = resolve(filesDir, 'clients', CLIENT_A, 'documents', docId)
    expect(readFileSync(onDisk).equals(Buffer.from(pdf))).toBe(true)
    const audit = await db.execute({ sql: 'SELECT client_id, data FROM audit_log WHERE action = ? AND entity_id = ?', args: ['document.created', docId] })
    expect(audit.rows).toHaveLength(1)
    expect(audit.rows[0]!.client_id).toBe(CLIENT_A)
    expect(JSON.parse(String(audit.rows[0]!.data))).toMatchObject({ title: TITLE, kind: 'clinician-letter' })
  })

  it('lists it for the household, its trainer and the admin; others get 404', async () => {
    for (const a of [trainer, handler, admin]) {
      const res = await a.get(`/api/clients/${CLIENT_A}/documents`)
      expect(res.status).toBe(200)
      expect(res.body.rows.map((r: { id: string }) => r.id)).toEqual([docId])
    }
    expect((await handlerB.get(`/api/clients/${CLIENT_A}/documents`)).status).toBe(404)
    expect((await trainerB.get(`/api/clients/${CLIENT_A}/documents`)).status).toBe(404)
    expect((await new Agent(baseUrl).get(`/api/clients/${CLIENT_A}/documents`)).status).toBe(401)
  })

  it('downloads through the route with its type, an RFC 6266/5987 file name, nosniff and no caching', async () => {
    const res = await fetch(`${baseUrl}/api/documents/${docId}`, { headers: { cookie: handler.cookie } })
    expect(res.status).toBe(200)
    expect(res.headers.get('content-type')).toBe('application/pdf')
    // The title's double quotes become apostrophes; ü is C3 BC and ß C3 9F in UTF-8 (Unicode code charts, from memory).
    expect(res.headers.get('content-disposition')).toBe(
      'attachment; filename="Brief von Dr. Jurgen \'Jo\' Weiss.pdf"; filename*=UTF-8\'\'Brief%20von%20Dr.%20J%C3%BCrgen%20%27Jo%27%20Wei%C3%9F.pdf',
    )
    expect(res.headers.get('x-content-type-options')).toBe('nosniff')
    expect(res.headers.get('cache-control')).toBe('private, no-store')
    expect(Buffer.from(await res.arrayBuffer()).equals(Buffer.from(pdf))).toBe(true)

    const inline = await fetch(`${baseUrl}/api/documents/${docId}?inline=1`, { headers: { cookie: trainer.cookie } })
    expect(inline.headers.get('content-disposition')).toMatch(/^inline; filename="/)
    await inline.arrayBuffer()

    const part = await fetch(`${baseUrl}/api/documents/${docId}`, { headers: { cookie: trainer.cookie, range: 'bytes=0-7' } })
    expect(part.status).toBe(206)
    expect(part.headers.get('content-range')).toBe(`bytes 0-7/${pdf.length}`)
    expect(Buffer.from(await part.arrayBuffer()).toString('latin1')).toBe('%PDF-1.4')
    const past = await fetch(`${baseUrl}/api/documents/${docId}`, { headers: { cookie: trainer.cookie, range: `bytes=${pdf.length}-` } })
    expect(past.status).toBe(416)
    await past.arrayBuffer()
  })

  it('answers 404 to another household and another trainer, exactly like a missing id', async () => {
    const b = await handlerB.get(`/api/documents/${docId}`)
    const missing = await handlerB.get('/api/documents/00000000-0000-4000-a000-000000000000')
    expect(b.status).toBe(404)
    expect(missing.status).toBe(404)
    expect(b.body.message).toBe(missing.body.message)
    expect((await trainerB.get(`/api/documents/${docId}`)).status).toBe(404)
    expect((await new Agent(baseUrl).get(`/api/documents/${docId}`)).status).toBe(401)
  })

  it('renames and changes the kind (trainer); the handler gets 403, another trainer 404, an empty title 422', async () => {
    const res = await trainer.patch(`/api/documents/${docId}`, { title: 'Letter from the clinic, spring', kind: 'assessment-report' })
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect(res.body).toMatchObject({ id: docId, title: 'Letter from the clinic, spring', kind: 'assessment-report' })
    expect((await handler.patch(`/api/documents/${docId}`, { title: 'Mine now' })).status).toBe(403)
    expect((await trainerB.patch(`/api/documents/${docId}`, { title: 'Mine now' })).status).toBe(404)
    const empty = await trainer.patch(`/api/documents/${docId}`, { title: '   ' })
    expect(empty.status).toBe(422)
    expect(empty.body.data.fieldErrors.title).toBe('Give the document a title.')
    const row = await db.execute({ sql: 'SELECT title, kind FROM documents WHERE id = ?', args: [docId] })
    expect(row.rows[0]).toMatchObject({ title: 'Letter from the clinic, spring', kind: 'assessment-report' })
    const audit = await db.execute({ sql: 'SELECT count(*) AS n FROM audit_log WHERE action = ? AND entity_id = ? AND client_id = ?', args: ['document.updated', docId, CLIENT_A] })
    expect(Number(audit.rows[0]!.n)).toBe(1)
  })

  it('lets the household\'s handler upload to their own file (title from the file name) but not delete', async () => {
    const res = await handler.request('POST', `/api/clients/${CLIENT_A}/documents`, form({ kind: 'vaccination-record' }, { bytes: tinyPng(), name: 'Juniper vaccinations 2026.png', type: 'image/png' }))
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    expect(res.body).toMatchObject({ title: 'Juniper vaccinations 2026', contentType: 'image/png', uploadedBy: { name: 'Ada Fairweather' } })
    const del = await handler.delete(`/api/documents/${res.body.id}`)
    expect(del.status).toBe(403)
    expect(existsSync(resolve(filesDir, 'clients', CLIENT_A, 'documents', res.body.id))).toBe(true)
  })

  it('deletes the row and the file (trainer), recording the title and kind in the audit log', async () => {
    expect((await trainerB.delete(`/api/documents/${docId}`)).status).toBe(404)
    const onDisk = resolve(filesDir, 'clients', CLIENT_A, 'documents', docId)
    expect(existsSync(onDisk)).toBe(true)
    const res = await trainer.delete(`/api/documents/${docId}`)
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ id: docId, title: 'Letter from the clinic, spring' })
    expect(existsSync(onDisk)).toBe(false)
    expect((await db.execute({ sql: 'SELECT count(*) AS n FROM documents WHERE id = ?', args: [docId] })).rows[0]!.n).toBe(0)
    expect((await trainer.get(`/api/documents/${docId}`)).status).toBe(404)
    const audit = await db.execute({ sql: 'SELECT client_id, data FROM audit_log WHERE action = ? AND entity_id = ?', args: ['document.deleted', docId] })
    expect(audit.rows[0]!.client_id).toBe(CLIENT_A)
    expect(JSON.parse(String(audit.rows[0]!.data))).toMatchObject({ title: 'Letter from the clinic, spring', kind: 'assessment-report' })
  })
})

describe('refused uploads leave nothing behind', () => {
  async function refused(agent: Agent, body: FormData, clientId = CLIENT_A) {
    const files = storedFiles()
    const rows = await documentCount()
    const res = await agent.request('POST', `/api/clients/${clientId}/documents`, body)
    expect(storedFiles()).toEqual(files)
    expect(await documentCount()).toBe(rows)
    return res
  }

  it('a text file named .pdf → 415 naming the accepted types', async () => {
    const res = await refused(trainer, form({ kind: 'consent' }, { bytes: new TextEncoder().encode('Just some notes, not a PDF at all.\n'), name: 'consent.pdf', type: 'application/pdf' }))
    expect(res.status).toBe(415)
    expect(res.body.message).toContain('PDF, JPEG, PNG or HEIC')
    expect(res.body.message).toContain('whatever its name says')
  })

  it('an HTML page or an SVG disguised as an image → 415', async () => {
    const html = await refused(trainer, form({ kind: 'other' }, { bytes: new TextEncoder().encode('<!doctype html><script>alert(1)</script>'), name: 'photo.png', type: 'image/png' }))
    expect(html.status).toBe(415)
    const svg = await refused(trainer, form({ kind: 'other' }, { bytes: new TextEncoder().encode('<svg xmlns="http://www.w3.org/2000/svg"></svg>'), name: 'x.jpg' }))
    expect(svg.status).toBe(415)
  })

  it('a file one byte over the limit → 413 (the real size, the body being under the Content-Length bound)', async () => {
    const big = new Uint8Array(DOCUMENT_MAX_BYTES + 1)
    big.set(minimalPdf('x'))
    const res = await refused(trainer, form({ kind: 'other' }, { bytes: big, name: 'big.pdf' }))
    expect(res.status).toBe(413)
    expect(res.body.message).toContain('15 MB')
  })

  it('a body whose Content-Length is past the limit → 413 before it is read', async () => {
    const big = new Uint8Array(DOCUMENT_MAX_BYTES + 200_000)
    big.set(minimalPdf('x'))
    const res = await refused(trainer, form({ kind: 'other' }, { bytes: big, name: 'big.pdf' }))
    expect(res.status).toBe(413)
  })

  it('a chunked body without Content-Length that grows past the limit → 413', async () => {
    const files = storedFiles()
    const boundary = 'forescent-test-boundary'
    const head = new TextEncoder().encode(`--${boundary}\r\nContent-Disposition: form-data; name="kind"\r\n\r\nother\r\n--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="endless.pdf"\r\nContent-Type: application/pdf\r\n\r\n%PDF-1.4\n`)
    const chunk = new Uint8Array(1024 * 1024)
    let sent = 0
    const body = new ReadableStream<Uint8Array>({
      pull(controller) {
        if (sent === 0) controller.enqueue(head)
        if (sent > DOCUMENT_MAX_BYTES + 4 * 1024 * 1024) { controller.close(); return }
        controller.enqueue(chunk)
        sent += chunk.length
      },
    })
    const res = await fetch(`${baseUrl}/api/clients/${CLIENT_A}/documents`, {
      method: 'POST', body, duplex: 'half', headers: { 'cookie': trainer.cookie, 'origin': baseUrl, 'content-type': `multipart/form-data; boundary=${boundary}` },
    } as RequestInit)
    expect(res.status).toBe(413)
    await res.arrayBuffer()
    expect(storedFiles()).toEqual(files)
  })

  it('an empty file → 422 with the message on the file field', async () => {
    const res = await refused(trainer, form({ kind: 'consent' }, { bytes: new Uint8Array(0), name: 'empty.pdf' }))
    expect(res.status).toBe(422)
    expect(res.body.data.fieldErrors.file).toMatch(/empty/)
  })

  it('no file or no kind → 422 listing both fields', async () => {
    const res = await refused(trainer, form({ title: 'No file here' }))
    expect(res.status).toBe(422)
    expect(res.body.data.fieldErrors).toMatchObject({ file: 'Choose a file to upload.', kind: 'Choose what kind of document this is.' })
    const noKind = await refused(trainer, form({}, { bytes: minimalPdf('x'), name: 'a.pdf' }))
    expect(noKind.status).toBe(422)
    expect(Object.keys(noKind.body.data.fieldErrors)).toEqual(['kind'])
  })

  it('JSON instead of multipart → 415 saying how to send it', async () => {
    const res = await trainer.post(`/api/clients/${CLIENT_A}/documents`, { kind: 'consent' })
    expect(res.status).toBe(415)
    expect(res.body.message).toContain('multipart/form-data')
  })

  it('another household\'s client → 404 for its trainer and handler alike', async () => {
    const pdf = minimalPdf('x')
    expect((await refused(trainer, form({ kind: 'consent' }, { bytes: pdf, name: 'a.pdf' }), CLIENT_B)).status).toBe(404)
    expect((await refused(handler, form({ kind: 'consent' }, { bytes: pdf, name: 'a.pdf' }), CLIENT_B)).status).toBe(404)
    expect((await refused(handlerB, form({ kind: 'consent' }, { bytes: pdf, name: 'a.pdf' }), CLIENT_A)).status).toBe(404)
  })

  it('when recording fails after the file was written, the file is removed again (503, not 500)', async () => {
    await db.execute('CREATE TRIGGER test_refuse_documents BEFORE INSERT ON documents BEGIN SELECT RAISE(ABORT, \'refused by the test\'); END')
    try {
      const res = await refused(trainer, form({ kind: 'consent' }, { bytes: minimalPdf('x'), name: 'a.pdf' }))
      expect(res.status).toBe(503)
      expect(res.body.message).toContain('nothing was kept')
    }
    finally {
      await db.execute('DROP TRIGGER test_refuse_documents')
    }
  })
})

describe('the dog\'s photo', () => {
  const photo = (bytes: Uint8Array<ArrayBuffer>, name: string) => form({}, { bytes, name })

  it('404 before there is one; the trainer adds one; the household sees it', async () => {
    expect((await handler.get(`/api/dogs/${DOG_A}/photo`)).status).toBe(404)
    const png = tinyPng()
    const res = await trainer.request('PUT', `/api/dogs/${DOG_A}/photo`, photo(png, 'juniper.png'))
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect(res.body).toMatchObject({ dogId: DOG_A, contentType: 'image/png', sizeBytes: png.length })
    const got = await fetch(`${baseUrl}/api/dogs/${DOG_A}/photo`, { headers: { cookie: handler.cookie } })
    expect(got.status).toBe(200)
    expect(got.headers.get('content-type')).toBe('image/png')
    expect(got.headers.get('x-content-type-options')).toBe('nosniff')
    expect(Buffer.from(await got.arrayBuffer()).equals(Buffer.from(png))).toBe(true)
    const again = await fetch(`${baseUrl}/api/dogs/${DOG_A}/photo`, { headers: { cookie: handler.cookie, 'if-none-match': got.headers.get('etag')! } })
    expect(again.status).toBe(304)
    expect(storedFiles().filter(f => f.includes(`/dogs/${DOG_A}/`))).toHaveLength(1)
  })

  it('replacing it stores the new file and removes the old one', async () => {
    const before = storedFiles().filter(f => f.includes(`/dogs/${DOG_A}/`))
    const res = await admin.request('PUT', `/api/dogs/${DOG_A}/photo`, photo(tinyHeic(), 'IMG_2041.HEIC'))
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect(res.body.contentType).toBe('image/heic')
    const after = storedFiles().filter(f => f.includes(`/dogs/${DOG_A}/`))
    expect(after).toHaveLength(1)
    expect(after[0]).not.toBe(before[0])
    expect(readFileSync(after[0]!).equals(Buffer.from(tinyHeic()))).toBe(true)
    const got = await fetch(`${baseUrl}/api/dogs/${DOG_A}/photo`, { headers: { cookie: trainer.cookie } })
    expect(got.headers.get('content-type')).toBe('image/heic')
    await got.arrayBuffer()
    const audit = await db.execute({ sql: 'SELECT action FROM audit_log WHERE entity_id = ? AND client_id = ? ORDER BY id', args: [DOG_A, CLIENT_A] })
    expect(audit.rows.map(r => r.action)).toEqual(['dog.photo.added', 'dog.photo.replaced'])
  })

  it('handlers may not change it (403); other households get 404; a dog without one 404', async () => {
    const files = storedFiles()
    expect((await handler.request('PUT', `/api/dogs/${DOG_A}/photo`, photo(tinyPng(), 'p.png'))).status).toBe(403)
    expect((await trainerB.request('PUT', `/api/dogs/${DOG_A}/photo`, photo(tinyPng(), 'p.png'))).status).toBe(404)
    expect((await handlerB.get(`/api/dogs/${DOG_A}/photo`)).status).toBe(404)
    expect((await trainerB.get(`/api/dogs/${DOG_A}/photo`)).status).toBe(404)
    expect((await trainer.get(`/api/dogs/${DOG_A2}/photo`)).status).toBe(404)
    expect((await trainer.get('/api/dogs/no-such-dog/photo')).status).toBe(404)
    expect(storedFiles()).toEqual(files)
  })

  it('a PDF, an empty file or one over 8 MB is refused and nothing changes', async () => {
    const files = storedFiles()
    const pdf = await trainer.request('PUT', `/api/dogs/${DOG_A}/photo`, photo(minimalPdf('x'), 'juniper.jpg'))
    expect(pdf.status).toBe(415)
    expect(pdf.body.message).toContain('JPEG, PNG or HEIC')
    expect((await trainer.request('PUT', `/api/dogs/${DOG_A}/photo`, photo(new Uint8Array(0), 'a.png'))).status).toBe(422)
    const big = new Uint8Array(DOG_PHOTO_MAX_BYTES + 1)
    big.set(tinyPng())
    const tooBig = await trainer.request('PUT', `/api/dogs/${DOG_A}/photo`, photo(big, 'big.png'))
    expect(tooBig.status).toBe(413)
    expect(tooBig.body.message).toContain('8 MB')
    expect(storedFiles()).toEqual(files)
    const got = await fetch(`${baseUrl}/api/dogs/${DOG_A}/photo`, { headers: { cookie: trainer.cookie } })
    expect(got.headers.get('content-type')).toBe('image/heic')
    await got.arrayBuffer()
  })
})
