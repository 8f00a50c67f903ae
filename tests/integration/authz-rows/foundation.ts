import { CLIENT_A, CLIENT_B, TRAINER_A, TRAINER3_ID } from '../../support/people'
import { adminOnly, everyone, expect, ids, signedIn, type Actor, type Row } from '../../support/authz'

export const rows: Row[] = [
  { route: 'POST /api/auth/login', path: '/api/auth/login', body: { email: TRAINER_A, password: 'not-the-password' }, expect: everyone(401) },
  { route: 'POST /api/auth/logout', path: '/api/auth/logout', expect: everyone(200), mutates: true },
  { route: 'GET /api/auth/me', path: '/api/auth/me', expect: signedIn(200) },
  // One address per actor: a single address asked for more than five times an hour is throttled (server/utils/throttle.ts).
  { route: 'POST /api/auth/forgot-password', path: '/api/auth/forgot-password', body: (actor: Actor) => ({ email: `nobody.${actor}@example.test` }), expect: everyone(200) },
  { route: 'POST /api/auth/reset-password', path: '/api/auth/reset-password', body: { token: 'x'.repeat(43), password: 'a-long-enough-password' }, expect: everyone(400) },
  { route: 'POST /api/account/password', path: '/api/account/password', body: { currentPassword: 'wrong-password', newPassword: 'a-long-enough-password' }, expect: signedIn(422) },
  { route: 'GET /api/invitations/[token]', path: `/api/invitations/${'y'.repeat(43)}`, expect: everyone(404) },
  { route: 'POST /api/invitations/[token]/accept', path: `/api/invitations/${'y'.repeat(43)}/accept`, body: { password: 'a-long-enough-password' }, expect: everyone(404) },
  {
    route: 'POST /api/invitations', path: '/api/invitations', mutates: true,
    body: { role: 'handler', clientId: CLIENT_A, email: 'new.handler@example.test', name: 'New Handler' },
    expect: { anonymous: 401, handlerA: 403, handlerB: 403, trainerA: 201, trainerB: 404, admin: 201 },
  },
  {
    route: 'GET /api/clients', path: '/api/clients?pageSize=200',
    expect: {
      anonymous: 401,
      handlerA: { status: 200, check: r => expect(ids(r)).toEqual([CLIENT_A]) },
      handlerB: { status: 200, check: r => expect(ids(r)).toEqual([CLIENT_B]) },
      trainerA: { status: 200, check: r => { expect(ids(r)).toContain(CLIENT_A); expect(ids(r)).not.toContain(CLIENT_B) } },
      trainerB: { status: 200, check: r => { expect(ids(r)).toContain(CLIENT_B); expect(ids(r)).not.toContain(CLIENT_A) } },
      admin: { status: 200, check: r => { expect(ids(r)).toContain(CLIENT_A); expect(ids(r)).toContain(CLIENT_B) } },
    },
  },
  {
    route: 'GET /api/clients/[id]', path: `/api/clients/${CLIENT_A}`,
    expect: { anonymous: 401, handlerA: 200, handlerB: 404, trainerA: 200, trainerB: 404, admin: 200 },
  },
  { route: 'GET /api/users', path: '/api/users', expect: adminOnly(200) },
  { route: 'PATCH /api/users/[id]', path: `/api/users/${TRAINER3_ID}`, body: { name: 'Ines Okoro' }, expect: adminOnly(200) },
]
