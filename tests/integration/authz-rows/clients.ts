import { CLIENT_A, HANDLER_A_ID, TRAINER3_ID, TRAINER_A_ID } from '../../support/people'
import { clientA, type Actor, type Row } from '../../support/authz'

const intake = { householdName: 'Matrix household', personName: 'Matrix Person', condition: 'migraine', inviteHandler: false }

export const rows: Row[] = [
  {
    route: 'POST /api/clients', path: '/api/clients', mutates: true,
    body: (actor: Actor) => (actor === 'admin' ? { ...intake, trainerId: TRAINER_A_ID } : intake),
    expect: { anonymous: 401, handlerA: 403, handlerB: 403, trainerA: 201, trainerB: 201, admin: 201 },
  },
  { route: 'PATCH /api/clients/[id]', path: `/api/clients/${CLIENT_A}`, body: { notes: 'Prefers morning visits.' }, mutates: true, expect: clientA(200, 403) },
  { route: 'PATCH /api/clients/[id]/contact', path: `/api/clients/${CLIENT_A}/contact`, body: { phone: '01632 960123' }, mutates: true, expect: clientA(200) },
  { route: 'DELETE /api/clients/[id]/handlers/[userId]', path: `/api/clients/${CLIENT_A}/handlers/${HANDLER_A_ID}`, mutates: true, expect: clientA(200, 403) },
  { route: 'GET /api/clients/[id]/activity', path: `/api/clients/${CLIENT_A}/activity`, expect: clientA(200, 403) },
  {
    route: 'POST /api/clients/[id]/reassign', path: `/api/clients/${CLIENT_A}/reassign`, body: { trainerId: TRAINER3_ID }, mutates: true,
    expect: { anonymous: 401, handlerA: 403, handlerB: 403, trainerA: 403, trainerB: 403, admin: 200 },
  },
]
