import { adminOnly, signedIn, type Row } from '../../support/authz'

export const rows: Row[] = [
  { route: 'GET /api/settings', path: '/api/settings', expect: adminOnly(200) },
  { route: 'GET /api/settings/[key]', path: '/api/settings/business', expect: signedIn(200) },
  {
    route: 'PUT /api/settings/[key]', path: '/api/settings/business', mutates: true,
    body: { name: 'Larkspur Scent Partners', timeZone: 'Europe/London', locale: 'en-GB', currency: 'GBP' },
    expect: adminOnly(200),
  },
]

// The business's logo: the office uploads and removes it; every signed-in person may see it (it heads their documents).
// A 1×1 PNG (made for this test).
export const TINY_PNG = Buffer.from('iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAQAAAC1HAwCAAAAC0lEQVR42mNkYAAAAAYAAjCB0C8AAAAASUVORK5CYII=', 'base64')
const logoForm = () => {
  const body = new FormData()
  body.append('file', new Blob([TINY_PNG], { type: 'image/png' }), 'logo.png')
  return { body }
}
async function uploadLogo(admin: import('../../support/http').Agent) {
  const res = await admin.request('POST', '/api/business-logo', logoForm().body)
  if (res.status !== 201) throw new Error(`Could not upload the logo: ${res.status} ${JSON.stringify(res.body)}`)
  return { id: String(res.body.logoId) }
}
rows.push(
  { route: 'POST /api/business-logo', path: '/api/business-logo', raw: logoForm, mutates: true, expect: adminOnly(201) },
  { route: 'DELETE /api/business-logo', path: '/api/business-logo', mutates: true, expect: adminOnly(200) },
  { route: 'GET /api/business-logo', path: '/api/business-logo', expect: signedIn(200) },
  { route: 'GET /api/business-logo/[id]', path: (_a, ctx) => `/api/business-logo/${ctx.id}`, prepare: uploadLogo, mutates: true, expect: signedIn(200) },
)
