import { seedId } from '../../../scripts/lib/seed-data'
import { CLIENT_A } from '../../support/people'
import { clientA, expect, type Row } from '../../support/authz'

// Seeded homework (scripts/lib/seed-homework.ts): client A (Fairweather) has an open assignment with a video waiting
// for review and a done one whose approved video has two comments; client B (Achterberg) has one video waiting.
const inDays = (n: number) => new Date(Date.now() + n * 86_400_000).toISOString().slice(0, 10)
const EXERCISE = seedId('exercise:two-controls') // written by trainer A
const ASSIGNMENT = seedId('assignment:fairweather:two-controls')
const VIDEO = seedId('video:fairweather:two-controls:1')
const COMMENT = seedId('comment:fairweather:hold-alert:1:0')
const staffOnly = (trainerA: number, trainerB = trainerA, admin = trainerA) => ({ anonymous: 401, handlerA: 403, handlerB: 403, trainerA, trainerB, admin })

export const rows: Row[] = [
  {
    route: 'GET /api/homework-exercises', path: '/api/homework-exercises',
    expect: { ...staffOnly(200), trainerB: { status: 200, check: r => expect(r.body.rows.length).toBe(4) } },
  },
  {
    route: 'POST /api/homework-exercises', path: '/api/homework-exercises', mutates: true,
    body: { title: 'Short search in the garden', instructions: 'Hide one target under a flowerpot; film the search.', expectedVideos: 1 },
    expect: { ...staffOnly(201), trainerB: { status: 201, check: r => expect(r.body.createdById).toBeTruthy() } },
  },
  // The library is shared; the trainer who wrote an exercise and the office change it.
  { route: 'PATCH /api/homework-exercises/[id]', path: `/api/homework-exercises/${EXERCISE}`, mutates: true, body: { expectedVideos: 2 }, expect: staffOnly(200, 403) },
  { route: 'DELETE /api/homework-exercises/[id]', path: `/api/homework-exercises/${EXERCISE}`, mutates: true, expect: staffOnly(200, 403) },
  {
    route: 'GET /api/clients/[id]/homework', path: `/api/clients/${CLIENT_A}/homework`,
    expect: { ...clientA(200), handlerA: { status: 200, check: r => expect(r.body.rows.map((a: { id: string }) => a.id)).toContain(ASSIGNMENT) } },
  },
  {
    route: 'POST /api/clients/[id]/homework', path: `/api/clients/${CLIENT_A}/homework`, mutates: true,
    body: () => ({ exerciseId: seedId('exercise:blind-line-up'), dueDay: inDays(6) }),
    expect: { ...clientA(201, 403), trainerA: { status: 201, check: r => expect(r.body.title).toBe('Blind line-up set by a helper') } },
  },
  { route: 'GET /api/homework-assignments/[id]', path: `/api/homework-assignments/${ASSIGNMENT}`, expect: { ...clientA(200), handlerA: { status: 200, check: r => expect(r.body.canUpload).toBe(true) } } },
  { route: 'PATCH /api/homework-assignments/[id]', path: `/api/homework-assignments/${ASSIGNMENT}`, mutates: true, body: () => ({ dueDay: inDays(8) }), expect: clientA(200, 403) },
  // A note about one practice, often sent late from a phone that had no signal.
  { route: 'POST /api/homework-assignments/[id]/notes', path: `/api/homework-assignments/${ASSIGNMENT}/notes`, mutates: true, body: { body: 'Two good alerts in the garden, one miss by the shed.' }, expect: clientA(201) },
  { route: 'POST /api/homework-assignments/[id]/cancel', path: `/api/homework-assignments/${ASSIGNMENT}/cancel`, mutates: true, body: {}, expect: clientA(200, 403) },
  {
    route: 'GET /api/homework-videos', path: '/api/homework-videos',
    expect: {
      ...staffOnly(200),
      trainerA: { status: 200, check: r => expect(r.body.rows.map((v: { id: string }) => v.id)).toEqual([VIDEO]) },
      trainerB: { status: 200, check: r => expect(r.body.rows.map((v: { id: string }) => v.id)).toEqual([seedId('video:achterberg:hold-alert:1')]) },
      admin: { status: 200, check: r => expect(r.body.total).toBe(2) },
    },
  },
  { route: 'GET /api/homework-videos/[id]', path: `/api/homework-videos/${VIDEO}`, expect: { ...clientA(200), trainerA: { status: 200, check: r => expect(r.body.canReview).toBe(true) } } },
  { route: 'POST /api/homework-videos/[id]/comments', path: `/api/homework-videos/${VIDEO}/comments`, mutates: true, body: { atSeconds: 1.5, body: 'Good start.' }, expect: clientA(201, 403) },
  { route: 'POST /api/homework-videos/[id]/review', path: `/api/homework-videos/${VIDEO}/review`, mutates: true, body: { outcome: 'approved' }, expect: clientA(200, 403) },
  { route: 'DELETE /api/homework-comments/[id]', path: `/api/homework-comments/${COMMENT}`, mutates: true, expect: clientA(200, 403) },
]
