// The demo dogs' profiles: status history, health records and suitability assessments (used by seed-data.ts).
// Everything here is invented. Vaccination and treatment intervals are typical of UK practice (common practice) and
// only shape the demo; the app sets no default interval.
import { eq } from 'drizzle-orm'
import type { Database } from '../../server/database/client'
import * as s from '../../server/database/schema'
import type { TraitKey } from '../../shared/utils/dogs'

type Tx = Parameters<Parameters<Database['transaction']>[0]>[0]
type Status = 'assessment' | 'in-training' | 'placed' | 'retired' | 'withdrawn'

/** The dog tables, children before dogs, for the seed's delete list. */
export const DOG_TABLES_CHILD_FIRST = ['dog_assessments', 'dog_health_records', 'dog_status_changes'] as const

interface HealthSeed { kind: 'vaccination' | 'health-clearance' | 'parasite-treatment' | 'other', name: string, doneDaysAgo: number, dueInDays: number | null, note?: string }
interface DogProfileSeed {
  /** 999 opens the number range kept for test transponders (ISO 11784, from memory), so no real animal has these. */
  microchip: string
  scores: Record<TraitKey, number>
  assessmentNotes: string
  health: HealthSeed[]
  /** Days before the programme start the assessment began; placed dogs: days ago they were placed. */
  placedDaysAgo?: number
  /** Dogs still in assessment: the outcome of their first look. */
  outcome?: 'reassess' | 'decline'
}

const S = (scentDrive: number, focus: number, environmentalConfidence: number, sociability: number, startleRecovery: number, handlerEngagement: number) =>
  ({ scentDrive, focus, environmentalConfidence, sociability, startleRecovery, handlerEngagement })

const lepto = (doneDaysAgo: number, dueInDays: number): HealthSeed => ({ kind: 'vaccination', name: 'Leptospirosis booster', doneDaysAgo, dueInDays })
const worming = (doneDaysAgo: number, dueInDays: number): HealthSeed => ({ kind: 'parasite-treatment', name: 'Worming', doneDaysAgo, dueInDays })

export const DOG_PROFILES: Record<string, DogProfileSeed> = {
  fairweather: {
    microchip: '999000000010001', scores: S(5, 4, 4, 5, 4, 5),
    assessmentNotes: 'Keen nose, settles quickly at home; a little unsure on shiny floors.',
    health: [
      { kind: 'vaccination', name: 'DHP booster', doneDaysAgo: 400, dueInDays: 695 },
      lepto(353, 12), // due soon in the demo
      worming(40, 50),
      { kind: 'health-clearance', name: 'Hip and elbow scoring', doneDaysAgo: 300, dueInDays: null, note: 'Scored within breed norms.' },
    ],
  },
  lindgren: {
    microchip: '999000000010002', scores: S(4, 4, 5, 4, 4, 4),
    assessmentNotes: 'Steady and curious; works well for short sessions.',
    health: [lepto(200, 165), worming(30, 60)],
  },
  moreau: {
    microchip: '999000000010003', scores: S(5, 3, 3, 4, 3, 4),
    assessmentNotes: 'Strong scent drive; needs help settling in busy places.',
    health: [lepto(380, -15), worming(20, 70)], // the booster is overdue in the demo
  },
  nakashima: {
    microchip: '999000000010004', scores: S(4, 5, 4, 5, 4, 5), placedDaysAgo: 90,
    assessmentNotes: 'Calm, attentive, very fond of her person.',
    health: [lepto(100, 265), { kind: 'health-clearance', name: 'Eye examination', doneDaysAgo: 500, dueInDays: null }],
  },
  achterberg: {
    microchip: '999000000010005', scores: S(4, 4, 4, 5, 4, 4),
    assessmentNotes: 'Friendly and food-motivated; loses interest after long sessions.',
    health: [lepto(60, 305), worming(45, 45)],
  },
  castellano: {
    microchip: '999000000010006', scores: S(5, 4, 4, 4, 5, 4),
    assessmentNotes: 'Confident everywhere; good recovery from sudden noise.',
    health: [lepto(320, 45), worming(80, 10)],
  },
  brennan: {
    microchip: '999000000010007', scores: S(3, 2, 3, 4, 2, 4), outcome: 'reassess',
    assessmentNotes: 'Young and easily startled; assess again in a few weeks.',
    health: [worming(10, 80)],
  },
  ferris: {
    microchip: '999000000010008', scores: S(4, 4, 4, 4, 4, 5),
    assessmentNotes: 'Eager worker with a strong bond to the family.',
    health: [lepto(150, 215), worming(25, 65)],
  },
}

/** A dog's status history consistent with its status, its health records and its assessment. */
export async function seedDogProfile(tx: Tx, o: {
  key: string, dogId: string, trainerId: string, status: Status, startedDaysAgo: number | null, today: Date, seedId: (name: string) => string
}) {
  const p = DOG_PROFILES[o.key]
  if (!p) return
  const at = (n: number) => new Date(o.today.getTime() - n * 86_400_000 + 9 * 3_600_000) // 09:00 UTC that day
  const day = (n: number) => at(n).toISOString().slice(0, 10)
  const start = o.startedDaysAgo ?? 0
  const assessFrom = start + 8
  const assessedAgo = start + 3
  await tx.update(s.dogs).set({ microchip: p.microchip, acceptedOn: o.status === 'assessment' ? null : day(assessedAgo) }).where(eq(s.dogs.id, o.dogId))
  const changes: { status: Status, ago: number, note: string }[] = [{ status: 'assessment', ago: assessFrom, note: 'Added to the client file.' }]
  if (o.status !== 'assessment') changes.push({ status: 'in-training', ago: start, note: 'Programme started.' })
  if (o.status === 'placed') changes.push({ status: 'placed', ago: p.placedDaysAgo ?? 30, note: 'Passed the public access check; placed with the household.' })
  if (o.status === 'retired' || o.status === 'withdrawn') changes.push({ status: o.status, ago: Math.max(0, start - 30), note: 'Left the programme.' })
  await tx.insert(s.dogStatusChanges).values(changes.map((c, i) => ({
    id: o.seedId(`dog-status:${o.key}:${i}`), dogId: o.dogId, status: c.status, effectiveOn: day(c.ago), note: c.note,
    changedById: o.trainerId, createdAt: at(c.ago),
  })))
  await tx.insert(s.dogHealthRecords).values(p.health.map((h, i) => ({
    id: o.seedId(`dog-health:${o.key}:${i}`), dogId: o.dogId, kind: h.kind, name: h.name, doneOn: day(h.doneDaysAgo),
    dueOn: h.dueInDays === null ? null : day(-h.dueInDays), note: h.note ?? null, createdById: o.trainerId,
    createdAt: at(h.doneDaysAgo), updatedAt: at(h.doneDaysAgo),
  })))
  await tx.insert(s.dogAssessments).values({
    id: o.seedId(`dog-assessment:${o.key}`), dogId: o.dogId, assessedOn: day(assessedAgo), createdAt: at(assessedAgo),
    assessorId: o.trainerId, scores: p.scores, notes: p.assessmentNotes, outcome: o.status === 'assessment' ? (p.outcome ?? 'reassess') : 'accept',
  })
}

/** Bulk dogs (benchmarks) are all in training: an 'accept' assessment and two status changes each. */
export function bulkDogHistory(o: { dogId: string, i: number, startedDaysAgo: number, trainerId: string, today: Date, seedId: (name: string) => string }) {
  const at = (n: number) => new Date(o.today.getTime() - n * 86_400_000)
  const day = (n: number) => at(n).toISOString().slice(0, 10)
  const base = { dogId: o.dogId, changedById: o.trainerId }
  return {
    changes: [
      { ...base, id: o.seedId(`bulk-dog-status:${o.i}:0`), status: 'assessment' as const, effectiveOn: day(o.startedDaysAgo + 7), createdAt: at(o.startedDaysAgo + 7) },
      { ...base, id: o.seedId(`bulk-dog-status:${o.i}:1`), status: 'in-training' as const, effectiveOn: day(o.startedDaysAgo), createdAt: at(o.startedDaysAgo) },
    ],
    assessment: {
      id: o.seedId(`bulk-dog-assessment:${o.i}`), dogId: o.dogId, assessedOn: day(o.startedDaysAgo + 2), assessorId: o.trainerId,
      scores: S(4, 4, 4, 4, 4, 4), outcome: 'accept' as const, createdAt: at(o.startedDaysAgo + 2),
    },
  }
}
