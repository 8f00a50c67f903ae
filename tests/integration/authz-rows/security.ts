// Second factor (issue 13): the sign-in step and each person's own set-up.
import { TRAINER3_ID } from '../../support/people'
import { adminOnly, everyone, signedIn, type Row } from '../../support/authz'

export const rows: Row[] = [
  // Without a password checked first there is no sign-in step to finish: 401 for everyone.
  { route: 'POST /api/auth/second-factor', path: '/api/auth/second-factor', body: { code: '123456' }, expect: everyone(401) },
  { route: 'GET /api/account/second-factor', path: '/api/account/second-factor', expect: signedIn(200) },
  { route: 'POST /api/account/second-factor/start', path: '/api/account/second-factor/start', expect: signedIn(200), mutates: true },
  // Nothing waits to be confirmed for a person who has not started: 409.
  { route: 'POST /api/account/second-factor/confirm', path: '/api/account/second-factor/confirm', body: { code: '123456' }, expect: signedIn(409) },
  // Turning it off needs the password (the matrix sends no body with DELETE): 422.
  { route: 'POST /api/users/[id]/second-factor-reset', path: `/api/users/${TRAINER3_ID}/second-factor-reset`, expect: adminOnly(200), mutates: true },
  { route: 'DELETE /api/account/second-factor', path: '/api/account/second-factor', expect: signedIn(422) },
]
