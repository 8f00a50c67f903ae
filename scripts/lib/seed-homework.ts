// The demo homework (used by seed-data.ts). Everything here is invented and deterministic.
//  - The exercise library: four common exercises in our own words.
//  - Fairweather (trainer@): one open homework with a video waiting for review, one done with an approved video and
//    two timed comments, one open with nothing sent yet.
//  - Lindgren: homework two days overdue, nothing sent.
//  - Achterberg (trainer2@): open homework with a video waiting four days (past the review window).
// The videos are the committed 3-second sample (tests/fixtures/sample-3s.mp4) copied into local file storage; with
// no local storage folder (an S3 bucket configured) the seed leaves the videos out.
import { copyFileSync, mkdirSync, statSync } from 'node:fs'
import { dirname, resolve } from 'node:path'
import type { Database } from '../../server/database/client'
import * as s from '../../server/database/schema'

type Tx = Parameters<Parameters<Database['transaction']>[0]>[0]

/** The homework tables, children first, for the seed's delete list. */
export const HOMEWORK_TABLES_CHILD_FIRST = ['homework_comments', 'homework_videos', 'homework_uploads', 'homework_assignments', 'homework_exercises'] as const

const DAY = 86_400_000
const isoDay = (d: Date) => d.toISOString().slice(0, 10)
const SAMPLE = resolve(import.meta.dirname, '../../tests/fixtures/sample-3s.mp4')
// The sample's length: made with ffmpeg at duration=3 (tests/fixtures/README.md).
const SAMPLE_SECONDS = 3

interface SeedCtx { today: Date, seedId: (name: string) => string, filesDir: string | null }

export const HOMEWORK_EXERCISES = [
  {
    key: 'two-controls',
    title: 'Two controls and one target on the floor',
    expectedVideos: 1,
    instructions: 'Put three identical tins in a row on the floor, a stride apart: two with a control sample, one with a target sample. Ask someone else to set them out and swap places between trials so you do not know where the target is. Film the whole run from behind the dog, 5 trials, and reward only a clear alert at the target.',
  },
  {
    key: 'kitchen-proofing',
    title: 'Alert proofing in the kitchen while someone cooks',
    expectedVideos: 2,
    instructions: 'While someone cooks a meal with strong smells, hide one target sample at the dog\'s nose height in the kitchen. Let the dog search and alert while the cooking goes on. Film two short sessions on different days; stop early if the dog is overwhelmed.',
  },
  {
    key: 'hold-alert',
    title: 'Hold the alert until the handler responds',
    expectedVideos: 1,
    instructions: 'Offer a target sample in your hand. When the dog alerts, wait two seconds before you respond, then reward. Build up to five seconds over the week. Film one session of about ten repetitions.',
  },
  {
    key: 'blind-line-up',
    title: 'Blind line-up set by a helper',
    expectedVideos: 1,
    instructions: 'A helper sets out four stations (one target, three controls, or sometimes all controls) while you wait out of the room. Run six trials without knowing the answer; the helper notes the result. Film from the doorway so the helper is out of shot.',
  },
] as const

function copySample(ctx: SeedCtx, key: string): number | null {
  if (!ctx.filesDir) return null
  const target = resolve(ctx.filesDir, ...key.split('/'))
  mkdirSync(dirname(target), { recursive: true })
  copyFileSync(SAMPLE, target)
  return statSync(target).size
}

export async function seedHomework(tx: Tx, ctx: SeedCtx) {
  const id = ctx.seedId
  const at = (daysAgo: number, hour = 10) => new Date(ctx.today.getTime() - daysAgo * DAY + hour * 3_600_000)
  const dueIn = (days: number) => isoDay(new Date(ctx.today.getTime() + days * DAY))
  await tx.insert(s.homeworkExercises).values(HOMEWORK_EXERCISES.map(e => ({
    id: id(`exercise:${e.key}`), title: e.title, instructions: e.instructions, expectedVideos: e.expectedVideos,
    createdById: id('user:trainer'), createdAt: at(120), updatedAt: at(120),
  })))
  const ex = (key: (typeof HOMEWORK_EXERCISES)[number]['key']) => HOMEWORK_EXERCISES.find(e => e.key === key)!
  const assignment = (o: { key: string, client: string, trainer: string, exercise: (typeof HOMEWORK_EXERCISES)[number]['key'], milestone?: number, dueDay: string, state?: 'open' | 'done', setDaysAgo: number }) => ({
    id: id(`assignment:${o.key}`), clientId: id(`client:${o.client}`), dogId: id(`dog:${o.client}`),
    milestoneId: o.milestone === undefined ? null : id(`milestone:${o.client}:${o.milestone}`), exerciseId: id(`exercise:${o.exercise}`),
    title: ex(o.exercise).title, instructions: ex(o.exercise).instructions, expectedVideos: ex(o.exercise).expectedVideos,
    dueDay: o.dueDay, state: o.state ?? 'open' as const, setById: id(`user:${o.trainer}`), createdAt: at(o.setDaysAgo), updatedAt: at(o.setDaysAgo),
  })
  await tx.insert(s.homeworkAssignments).values([
    assignment({ key: 'fairweather:two-controls', client: 'fairweather', trainer: 'trainer', exercise: 'two-controls', milestone: 3, dueDay: dueIn(4), setDaysAgo: 3 }),
    assignment({ key: 'fairweather:hold-alert', client: 'fairweather', trainer: 'trainer', exercise: 'hold-alert', milestone: 3, dueDay: dueIn(-10), state: 'done', setDaysAgo: 20 }),
    assignment({ key: 'fairweather:kitchen', client: 'fairweather', trainer: 'trainer', exercise: 'kitchen-proofing', milestone: 3, dueDay: dueIn(9), setDaysAgo: 2 }),
    assignment({ key: 'lindgren:two-controls', client: 'lindgren', trainer: 'trainer', exercise: 'two-controls', dueDay: dueIn(-2), setDaysAgo: 9 }),
    assignment({ key: 'achterberg:hold-alert', client: 'achterberg', trainer: 'trainer2', exercise: 'hold-alert', milestone: 1, dueDay: dueIn(3), setDaysAgo: 8 }),
  ])

  const videos = [
    { key: 'fairweather:two-controls:1', assignment: 'fairweather:two-controls', client: 'fairweather', handler: 'handler', sentDaysAgo: 1, fileName: 'IMG_2231.MP4' },
    { key: 'fairweather:hold-alert:1', assignment: 'fairweather:hold-alert', client: 'fairweather', handler: 'handler', sentDaysAgo: 12, fileName: 'IMG_2104.MP4', review: { daysAgo: 11, outcome: 'approved' as const, notes: 'Lovely steady hold: she waited the full five seconds on most repetitions. Keep the reward quick once you respond.' } },
    { key: 'achterberg:hold-alert:1', assignment: 'achterberg:hold-alert', client: 'achterberg', handler: 'handler2', sentDaysAgo: 4, fileName: 'VID_20260411.mp4' },
  ]
  const rows = []
  for (const v of videos) {
    const videoId = id(`video:${v.key}`)
    const storageKey = `homework-videos/${id(`client:${v.client}`)}/${videoId}.mp4`
    const size = copySample(ctx, storageKey)
    if (size === null) continue
    rows.push({
      id: videoId, assignmentId: id(`assignment:${v.assignment}`), clientId: id(`client:${v.client}`), uploadedById: id(`user:${v.handler}`),
      fileName: v.fileName, contentType: 'video/mp4', size, storageKey, durationSeconds: SAMPLE_SECONDS,
      reviewOutcome: v.review?.outcome ?? null, reviewNotes: v.review?.notes ?? null,
      reviewedAt: v.review ? at(v.review.daysAgo, 18) : null, reviewedById: v.review ? id('user:trainer') : null,
      createdAt: at(v.sentDaysAgo, 19), updatedAt: at(v.review?.daysAgo ?? v.sentDaysAgo, 19),
    })
  }
  if (!rows.length) return
  await tx.insert(s.homeworkVideos).values(rows)
  if (rows.some(r => r.id === id('video:fairweather:hold-alert:1'))) {
    await tx.insert(s.homeworkComments).values([
      { id: id('comment:fairweather:hold-alert:1:0'), videoId: id('video:fairweather:hold-alert:1'), authorId: id('user:trainer'), atSeconds: 1, body: 'Here: a clear nose touch and she holds it. This is the alert we want.', createdAt: at(11, 17), updatedAt: at(11, 17) },
      { id: id('comment:fairweather:hold-alert:1:1'), videoId: id('video:fairweather:hold-alert:1'), authorId: id('user:trainer'), atSeconds: 2.5, body: 'Reward a touch sooner after you respond, so the hold stays the paid part.', createdAt: at(11, 17), updatedAt: at(11, 17) },
    ])
  }
}
