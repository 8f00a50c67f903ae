import { seedId } from '../../../scripts/lib/seed-data'
import { CLIENT_A } from '../../support/people'
import { clientA, expect, type Row } from '../../support/authz'
import type { Agent } from '../../support/http'
import { minimalPdf, tinyPng } from '../../support/files'

const DOG_A = seedId('dog:fairweather')

function pdfForm(kind = 'consent') {
  const f = new FormData()
  f.append('kind', kind)
  f.append('file', new Blob([minimalPdf('Matrix consent form (invented).')], { type: 'application/pdf' }), 'consent.pdf')
  return f
}
function pngForm() {
  const f = new FormData()
  f.append('file', new Blob([tinyPng()], { type: 'image/png' }), 'dog.png')
  return f
}

/** As admin: a document on client A's file, for the routes that need one. */
async function uploadDocument(admin: Agent) {
  const res = await admin.request('POST', `/api/clients/${CLIENT_A}/documents`, pdfForm())
  if (res.status !== 201) throw new Error(`Preparing a document failed: ${res.status} ${JSON.stringify(res.body)}`)
  return { id: res.body.id as string }
}
async function uploadPhoto(admin: Agent) {
  const res = await admin.request('PUT', `/api/dogs/${DOG_A}/photo`, pngForm())
  if (res.status !== 200) throw new Error(`Preparing a dog photo failed: ${res.status} ${JSON.stringify(res.body)}`)
  return {}
}

export const rows: Row[] = [
  {
    route: 'GET /api/clients/[id]/documents', path: `/api/clients/${CLIENT_A}/documents`, prepare: uploadDocument,
    expect: { ...clientA(200), handlerA: { status: 200, check: r => expect(r.body.rows.length).toBeGreaterThan(0) } },
  },
  // Handlers may upload to their own household's file (e.g. the dog's vaccination record).
  { route: 'POST /api/clients/[id]/documents', path: `/api/clients/${CLIENT_A}/documents`, raw: () => ({ body: pdfForm('vaccination-record') }), mutates: true, expect: clientA(201) },
  {
    route: 'GET /api/documents/[id]', path: (_a, ctx) => `/api/documents/${ctx.id}`, prepare: uploadDocument,
    expect: { ...clientA(200), handlerA: { status: 200, check: r => expect(r.headers.get('content-type')).toBe('application/pdf') } },
  },
  { route: 'PATCH /api/documents/[id]', path: (_a, ctx) => `/api/documents/${ctx.id}`, body: { title: 'Signed consent, renamed' }, prepare: uploadDocument, mutates: true, expect: clientA(200, 403) },
  { route: 'DELETE /api/documents/[id]', path: (_a, ctx) => `/api/documents/${ctx.id}`, prepare: uploadDocument, mutates: true, expect: clientA(200, 403) },
  { route: 'PUT /api/dogs/[id]/photo', path: `/api/dogs/${DOG_A}/photo`, raw: () => ({ body: pngForm() }), mutates: true, expect: clientA(200, 403) },
  {
    route: 'GET /api/dogs/[id]/photo', path: `/api/dogs/${DOG_A}/photo`, prepare: uploadPhoto, mutates: true,
    expect: { ...clientA(200), handlerA: { status: 200, check: r => expect(r.headers.get('content-type')).toBe('image/png') } },
  },
]
