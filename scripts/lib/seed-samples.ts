// The demo households' scent-sample banks (used by seed-data.ts). Everything here is invented; the rules the rows
// follow (6 rolls a bag, 5 bags an outer bag, 3 uses of up to 5 minutes, 183/365 days) are the default policy's,
// which is common practice. The stock status rows are computed with the same pure logic the server uses.
import { eq } from 'drizzle-orm'
import * as s from '../../server/database/schema'
import type { Database } from '../../server/database/client'
import {
  DEFAULT_SAMPLE_POLICY, bankSummary, discardReasonOf, restockTransition, sampleState, seededRandom, stockForecast, stockRosterValue, uniqueBagCode, useDiscards,
  type Bag, type Sample, type SampleKind, type SampleUse,
} from '../../shared/utils/samples'

type Tx = Parameters<Parameters<Database['transaction']>[0]>[0]

/** The sample tables, children before parents, for the seed's delete list. */
export const SAMPLE_TABLES_CHILD_FIRST = ['sample_bank_settings', 'sample_bank_status', 'sample_uses', 'samples', 'sample_outer_bags', 'sample_containers'] as const

const DAY = 86_400_000
const MIN = 60_000

interface SampleSeed {
  kind: SampleKind
  daysAgo: number
  rolls?: number
  /** Minutes between a meal and collecting, when the protocol was broken (compromised). */
  ateMinutesBefore?: number
  /** Quick-saved during an episode, checklist not yet answered. */
  quick?: boolean
  /** Answered but not yet put in an outer bag in the freezer. */
  unstored?: boolean
  /** Targets: minutes from the first symptoms to collecting (20 when left out). */
  symptomsMinutesBefore?: number
  /** Targets: medication for the episode taken before collecting. */
  medicationBefore?: boolean
}
interface BankSeed {
  key: string
  /** Training stage of the uses (imprinting uses throw the sample away: single use, common practice). */
  stage: 'imprinting' | 'discrimination' | 'alert' | 'maintenance'
  samples: SampleSeed[]
  /** A use of each kind every this many days over the last 4 weeks, on the oldest usable sample. */
  useEvery: Record<SampleKind, number>
  /** The household was reminded to collect this many days ago (its low-stock episode is under way). */
  remindedDaysAgo?: number
  /** The target use of this many days ago stayed out 9 minutes: over the limit, so it was the sample's last. */
  overLimitDaysAgo?: number
}

const t = (daysAgo: number) => ({ kind: 'target' as const, daysAgo })
const c = (daysAgo: number) => ({ kind: 'control' as const, daysAgo })

export const SAMPLE_BANKS: BankSeed[] = [
  // A healthy bank in discrimination work, with one target quick-saved yesterday during a migraine.
  {
    key: 'fairweather', stage: 'discrimination', useEvery: { target: 3, control: 3 },
    samples: [
      t(120), t(90), t(75), t(60), t(40), t(25), t(12), t(5), { kind: 'target', daysAgo: 1, quick: true }, c(130), c(100), c(80), c(50), c(30), c(14), c(7), c(3),
      // Two targets from this week's migraines still waiting to go into the freezer; one collected late in the
      // episode (95 minutes after the first symptoms) and one after a painkiller: both flagged for the trainer.
      { kind: 'target', daysAgo: 2, unstored: true }, { kind: 'target', daysAgo: 2, unstored: true },
      { kind: 'target', daysAgo: 9, symptomsMinutesBefore: 95 }, { kind: 'target', daysAgo: 16, medicationBefore: true },
    ],
  },
  // Running low on targets: used often, few collected since the programme began.
  {
    key: 'lindgren', stage: 'discrimination', useEvery: { target: 4, control: 5 }, remindedDaysAgo: 3,
    samples: [t(50), t(40), t(30), c(55), c(35), c(25), c(10)],
  },
  // A long-running placed team in maintenance work: an expired target, an old maintenance-only one, a compromised control.
  {
    key: 'nakashima', stage: 'maintenance', useEvery: { target: 7, control: 14 }, overLimitDaysAgo: 20,
    samples: [t(400), t(200), t(90), t(60), c(30), { kind: 'control', daysAgo: 20, ateMinutesBefore: 20 }, c(10)],
  },
  // A young bank: the old one was lost when the freezer failed; ten targets and eight controls collected eight days
  // ago, and imprinting starts again (each imprinting use throws its sample away). Measured over its own eight days,
  // the targets run out within 21 days: a restock is due (over the whole 28-day window it would read 42 days).
  {
    key: 'moreau', stage: 'imprinting', useEvery: { target: 2, control: 4 }, remindedDaysAgo: 1,
    samples: [...Array.from({ length: 10 }, () => t(8)), ...Array.from({ length: 8 }, () => c(8))],
  },
  // Client B: a small, fresh bank.
  {
    key: 'achterberg', stage: 'discrimination', useEvery: { target: 7, control: 7 },
    samples: [t(30), t(18), t(6), c(32), c(20), c(8)],
  },
]

export async function seedSampleBanks(tx: Tx, opts: { today: Date, seedId: (name: string) => string, handlerOf: (clientKey: string) => { id: string, email: string, name: string } }) {
  const { today, seedId } = opts
  const policy = DEFAULT_SAMPLE_POLICY
  const now = new Date(today.getTime() + 8 * 60 * MIN) // 08:00 UTC on the seed's day
  for (const bank of SAMPLE_BANKS) {
    const clientId = seedId(`client:${bank.key}`)
    const handler = opts.handlerOf(bank.key)
    const random = seededRandom(bank.key.length * 7919 + bank.samples.length)
    const taken = new Set<string>()
    const containers = (['target', 'control'] as const).map(kind => ({
      id: seedId(`sample-container:${bank.key}:${kind}`), clientId, kind, label: kind === 'target' ? 'Red-lid tub (targets)' : 'Grey-lid tub (controls)',
      createdById: handler.id, createdAt: new Date(now.getTime() - 200 * DAY), updatedAt: new Date(now.getTime() - 200 * DAY),
    }))
    await tx.insert(s.sampleContainers).values(containers)

    const rows = bank.samples.map((seed, i) => {
      const collectedAt = new Date(today.getTime() - seed.daysAgo * DAY + 7 * 60 * MIN) // 07:00 UTC, on waking
      const compromised = seed.ateMinutesBefore !== undefined
      const answers = seed.quick ? null : {
        lastAteAt: compromised ? new Date(collectedAt.getTime() - seed.ateMinutesBefore! * MIN).toISOString() : null,
        lastDrankOtherThanWaterAt: null, lastBrushedTeethAt: null, lastChewingGumAt: null, lastAlcoholAt: null, lastSmokedAt: null,
        lastWaterAt: null, unknown: [], washedHandsUnscented: true,
      }
      return {
        id: seedId(`sample:${bank.key}:${i}`), clientId, kind: seed.kind, bagCode: uniqueBagCode(seed.kind, taken, random),
        collectedAt, firstSymptomsAt: seed.kind === 'target' ? new Date(collectedAt.getTime() - (seed.symptomsMinutesBefore ?? 20) * MIN) : null,
        medicationBefore: seed.kind === 'target' ? seed.medicationBefore ?? false : null,
        collectorId: handler.id, rolls: seed.rolls ?? 4, answers, answersCompletedAt: seed.quick ? null : collectedAt,
        compromised,
        compromisedReasons: compromised ? [{ rule: 'fasting-food', message: `Only ${seed.ateMinutesBefore} minutes passed between eating and collecting; at least ${policy.fastingMinutes} minutes are needed.` }] : null,
        outerBagId: null as string | null, createdAt: collectedAt, updatedAt: collectedAt,
      }
    }).map((r) => { taken.add(r.bagCode); return r })

    // Outer bags: up to maxBagsPerOuterBag small bags of one kind each, in the container of that kind.
    const bags: (typeof s.sampleOuterBags.$inferInsert)[] = []
    for (const kind of ['target', 'control'] as const) {
      const mine = rows.filter((r, i) => r.kind === kind && r.answersCompletedAt !== null && !bank.samples[i]!.unstored)
      for (let i = 0; i < mine.length; i += policy.maxBagsPerOuterBag) {
        const id = seedId(`sample-outer-bag:${bank.key}:${kind}:${i}`)
        bags.push({ id, clientId, kind, label: `${kind === 'target' ? 'Target' : 'Control'} bag ${i / policy.maxBagsPerOuterBag + 1}`, containerId: containers.find(x => x.kind === kind)!.id, createdAt: mine[i]!.collectedAt, updatedAt: mine[i]!.collectedAt })
        for (const r of mine.slice(i, i + policy.maxBagsPerOuterBag)) r.outerBagId = id
      }
    }
    if (bags.length) await tx.insert(s.sampleOuterBags).values(bags)
    await tx.insert(s.samples).values(rows)

    // Uses over the last four weeks: each on the oldest sample still usable that day, 3 minutes out.
    const pureSamples: Bag[] = rows.map(r => ({
      id: r.id, kind: r.kind, collectedAt: r.collectedAt, compromised: r.compromised || r.answers === null,
      stored: r.outerBagId !== null, answersComplete: r.answers !== null,
    }))
    const pureUses: SampleUse[] = []
    const useRows: (typeof s.sampleUses.$inferInsert)[] = []
    const thrown = new Map<string, { at: Date, reason: string }>()
    for (const kind of ['target', 'control'] as const) {
      for (let d = 27; d >= 1; d -= bank.useEvery[kind]) {
        const outAt = new Date(today.getTime() - d * DAY + 18 * 60 * MIN) // 18:00 UTC, an evening session
        const candidates = pureSamples.filter(p => p.kind === kind && p.collectedAt < outAt)
        const pick = candidates.find((p) => {
          const status = pureState(p, pureUses, outAt)
          return status === 'usable' || (bank.stage === 'maintenance' && status === 'maintenance-only')
        })
        if (!pick) continue
        const overLimit = kind === 'target' && bank.overLimitDaysAgo === d
        const backAt = new Date(outAt.getTime() + (overLimit ? 9 : 3) * MIN)
        const use = { discarded: false, stage: bank.stage, overLimit }
        const discards = useDiscards(use, policy)
        pureUses.push({ sampleId: pick.id, outAt, backAt, ...use, discarded: discards })
        useRows.push({ id: seedId(`sample-use:${bank.key}:${kind}:${d}`), sampleId: pick.id, clientId, outAt, backAt, stage: bank.stage, discarded: discards, overLimit, recordedById: handler.id, createdAt: backAt, updatedAt: backAt })
        if (discards) thrown.set(pick.id, { at: backAt, reason: discardReasonOf(use, policy)! })
      }
    }
    if (useRows.length) await tx.insert(s.sampleUses).values(useRows)
    for (const [id, x] of thrown) await tx.update(s.samples).set({ discardedAt: x.at, discardReason: x.reason }).where(eq(s.samples.id, id))

    // The stock status the roster reads, as the server computes it.
    const forecast = stockForecast(pureSamples, pureUses, now, policy)
    const summary = bankSummary(pureSamples, pureUses, now, policy)
    const next = restockTransition(null, forecast)
    const remindedAt = bank.remindedDaysAgo !== undefined && next.restockDue ? new Date(now.getTime() - bank.remindedDaysAgo * DAY) : null
    await tx.insert(s.sampleBankStatus).values({
      clientId, summary: stockRosterValue(forecast, summary, remindedAt, rows.filter(r => r.answers === null).length) as unknown as Record<string, unknown>,
      restockDue: next.restockDue, restockEpisode: next.episode, restockDueSince: next.restockDue ? (remindedAt ?? now) : null,
      reminderQueuedAt: remindedAt, checkedAt: now,
    })
    // Its reminder went out already: the outbox row keeps the episode from being reminded again.
    if (remindedAt) {
      await tx.insert(s.outbox).values({
        toAddress: handler.email, subject: 'Time to collect more target samples', textBody: `Hello ${handler.name}, (demo) the sample bank is running low.`,
        dedupeKey: `sample-restock:${clientId}:${next.episode}:${handler.id}`, status: 'sent', attempts: 1, sentAt: remindedAt, createdAt: remindedAt, nextAttemptAt: remindedAt,
      })
    }
  }
}

function pureState(sample: Sample, uses: SampleUse[], at: Date) {
  return sampleState(sample, uses, at, DEFAULT_SAMPLE_POLICY).status
}
