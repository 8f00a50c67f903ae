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
