// The demo programmes and training logs (used by seed-data.ts). Everything here is invented and deterministic.
//  - The default programme template (shared/utils/training.ts DEFAULT_PROGRAMME).
//  - Fairweather: intake, sample bank and imprinting signed off; five discrimination sessions in the last weeks
//    (30 trials, two sessions blind): good figures, not yet enough for the discrimination milestone.
//  - Achterberg: intake signed off; one short session.
import { eq } from 'drizzle-orm'
import type { Database } from '../../server/database/client'
import * as s from '../../server/database/schema'
import { DEFAULT_PROGRAMME } from '../../shared/utils/training'

type Tx = Parameters<Parameters<Database['transaction']>[0]>[0]

/** The training tables, children before clients, for the seed's delete list. */
export const TRAINING_TABLES_CHILD_FIRST = ['training_trials', 'training_sessions', 'client_milestones', 'programme_templates'] as const

const DAY = 86_400_000
const isoDay = (d: Date) => d.toISOString().slice(0, 10)

interface SeedCtx { today: Date, seedId: (name: string) => string }

async function seedProgramme(tx: Tx, ctx: SeedCtx, key: string, trainerKey: string, confirmed: number, startedDaysAgo: number) {
  const clientId = ctx.seedId(`client:${key}`)
  await tx.insert(s.clientMilestones).values(DEFAULT_PROGRAMME.milestones.map((m, position) => ({
    id: ctx.seedId(`milestone:${key}:${position}`), clientId, position, name: m.name, handlerText: m.handlerText, measured: m.measured,
    confirmedAt: position < confirmed ? new Date(ctx.today.getTime() - (startedDaysAgo - position * 20) * DAY) : null,
    confirmedById: position < confirmed ? ctx.seedId(`user:${trainerKey}`) : null,
  })))
  await tx.update(s.clients).set({ programmeTemplateId: ctx.seedId('template:default') }).where(eq(s.clients.id, clientId))
}

/** One session of trials: `pattern` letters per trial — H hit, M miss, W wrong station, C correct rejection, F false alert on a blank. */
async function seedSession(tx: Tx, ctx: SeedCtx, o: { key: string, n: number, daysAgo: number, blind: boolean, runBy: 'trainer' | 'handler', runByKey: string, place: string, pattern: string }) {
  const clientId = ctx.seedId(`client:${o.key}`)
  const sessionId = ctx.seedId(`session:${o.key}:${o.n}`)
  const created = new Date(ctx.today.getTime() - o.daysAgo * DAY + 10 * 3_600_000)
  await tx.insert(s.trainingSessions).values({
    id: sessionId, clientId, dogId: ctx.seedId(`dog:${o.key}`), runBy: o.runBy, runById: ctx.seedId(`user:${o.runByKey}`),
    day: isoDay(new Date(ctx.today.getTime() - o.daysAgo * DAY)), place: o.place, stage: 'discrimination', blind: o.blind,
    conditions: o.blind ? 'Line-up set by a helper; handler did not know the target station.' : null, createdAt: created, updatedAt: created,
  })
  const stations = 3
  await tx.insert(s.trainingTrials).values([...o.pattern].map((c, i) => {
    const target = 'HMW'.includes(c) ? ((o.n + i) % stations) + 1 : null
    const indicated = c === 'H' ? target : c === 'W' ? (target! % stations) + 1 : c === 'F' ? ((i % stations) + 1) : null
    return {
      id: ctx.seedId(`trial:${o.key}:${o.n}:${i}`), sessionId, clientId, stations, targetStation: target, indicatedStation: indicated,
      latencySeconds: c === 'H' ? 4 + ((o.n * 7 + i * 3) % 9) : null, createdAt: new Date(created.getTime() + i * 60_000), updatedAt: created,
    }
  }))
}

export async function seedTraining(tx: Tx, ctx: SeedCtx) {
  await tx.insert(s.programmeTemplates).values({ id: ctx.seedId('template:default'), name: DEFAULT_PROGRAMME.name, isDefault: true, milestones: DEFAULT_PROGRAMME.milestones })
  await seedProgramme(tx, ctx, 'fairweather', 'trainer', 3, 142)
  await seedProgramme(tx, ctx, 'achterberg', 'trainer2', 1, 35)
  const fw = [
    { daysAgo: 20, blind: false, runBy: 'trainer', runByKey: 'trainer', place: 'Training barn', pattern: 'HHCHMC' },
    { daysAgo: 16, blind: false, runBy: 'handler', runByKey: 'handler', place: 'Kitchen at home', pattern: 'HCHHCH' },
    { daysAgo: 12, blind: true, runBy: 'trainer', runByKey: 'trainer', place: 'Training barn', pattern: 'HHCHFH' },
    { daysAgo: 8, blind: false, runBy: 'handler', runByKey: 'handler', place: 'Living room', pattern: 'CHHCHH' },
    { daysAgo: 4, blind: true, runBy: 'trainer', runByKey: 'trainer', place: 'Village hall', pattern: 'HCHHCH' },
  ] as const
  for (const [n, o] of fw.entries()) await seedSession(tx, ctx, { key: 'fairweather', n, ...o })
  await seedSession(tx, ctx, { key: 'achterberg', n: 0, daysAgo: 3, blind: false, runBy: 'trainer', runByKey: 'trainer2', place: 'Garden', pattern: 'HHMC' })
}

/**
 * Programmes and training logs for the bulk benchmark clients (seed-data.ts `extraClients`), so the roster's
 * readiness column is measured with real work to do: every bulk client gets the default programme with 0–4
 * milestones signed off; those whose current milestone is measured (discrimination, trained alert) get five
 * sessions of six trials in the last few weeks. Invented and deterministic.
 */
export async function seedBulkTraining(tx: Tx, ctx: SeedCtx, bulk: { clientId: string, dogId: string, trainerId: string, i: number }[]) {
  const milestones = []
  const sessions = []
  const trials = []
  for (const c of bulk) {
    const confirmed = c.i % 5
    milestones.push(...DEFAULT_PROGRAMME.milestones.map((m, position) => ({
      id: ctx.seedId(`bulk-milestone:${c.i}:${position}`), clientId: c.clientId, position, name: m.name, handlerText: m.handlerText, measured: m.measured,
      confirmedAt: position < confirmed ? new Date(ctx.today.getTime() - (120 - position * 20) * DAY) : null,
      confirmedById: position < confirmed ? c.trainerId : null,
    })))
    if (confirmed < 3) continue
    for (let n = 0; n < 5; n++) {
      const sessionId = ctx.seedId(`bulk-session:${c.i}:${n}`)
      const daysAgo = 3 + n * 4 + (c.i % 3)
      sessions.push({ id: sessionId, clientId: c.clientId, dogId: c.dogId, runBy: 'trainer' as const, runById: c.trainerId, day: isoDay(new Date(ctx.today.getTime() - daysAgo * DAY)), place: 'Training barn', stage: 'discrimination' as const, blind: n % 2 === 0 })
      for (let t = 0; t < 6; t++) {
        const target = t % 3 === 2 ? null : ((n + t) % 3) + 1
        const indicated = target === null ? ((c.i + n + t) % 11 === 0 ? 1 : null) : ((c.i + n + t) % 13 === 0 ? null : target)
        trials.push({ id: ctx.seedId(`bulk-trial:${c.i}:${n}:${t}`), sessionId, clientId: c.clientId, stations: 3, targetStation: target, indicatedStation: indicated })
      }
    }
  }
  const BATCH = 500
  for (let i = 0; i < milestones.length; i += BATCH) await tx.insert(s.clientMilestones).values(milestones.slice(i, i + BATCH))
  for (let i = 0; i < sessions.length; i += BATCH) await tx.insert(s.trainingSessions).values(sessions.slice(i, i + BATCH))
  for (let i = 0; i < trials.length; i += BATCH) await tx.insert(s.trainingTrials).values(trials.slice(i, i + BATCH))
}
