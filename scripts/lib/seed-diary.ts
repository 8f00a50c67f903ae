// The demo households' alert diaries (used by seed-data.ts). Everything here is invented and deterministic: a small
// linear congruential generator seeded per household gives the same entries every run, relative to the seed's day.
//  - Fairweather (migraine): four months, most migraines warned of 1–3 h ahead, a few false alerts, two reviewed.
//  - Nakashima (migraine, aftercare): good for months, then in the last month fewer migraines warned of and
//    shorter leads, so the refresher check is due (its first diary change e-mails the trainer).
//  - Achterberg (migraine, a new programme): a handful of entries, below the minimum evidence.
import type { Database } from '../../server/database/client'
import * as s from '../../server/database/schema'

type Tx = Parameters<Parameters<Database['transaction']>[0]>[0]

/** The diary tables, children before clients, for the seed's delete list. */
export const DIARY_TABLES_CHILD_FIRST = ['diary_windows', 'diary_entries'] as const

const MINUTE = 60_000
const DAY = 86_400_000

/** Numerical Recipes' LCG constants (Press et al., Numerical Recipes, 2nd ed., ch. 7.1): fine for demo data. */
function generator(seed: number) {
  let state = seed >>> 0
  return () => {
    state = (Math.imul(state, 1664525) + 1013904223) >>> 0
    return state / 2 ** 32
  }
}

interface Stretch {
  /** Days ago the stretch starts and ends (start > end ≥ 1). */
  fromDaysAgo: number
  toDaysAgo: number
  /** Mean days between episodes. */
  everyDays: number
  /** Chance an episode was warned of, and the range of lead times in minutes. */
  warnedChance: number
  leadMinutes: [number, number]
  /** Chance of a false alert on any given day. */
  falseAlertChance: number
}

interface DiarySeed {
  key: string
  handler: string
  trainer: string
  seed: number
  /** Local hours (UTC in the demo) when episodes usually begin. */
  onsetHours: [number, number]
  stretches: Stretch[]
  reviews?: { nth: number, comment: string }[]
  /** Hand-placed moments, written after the generated ones: minutes of a day `daysAgo` (UTC). */
  extra?: { kind: 'alert' | 'episode', daysAgo: number, minute: number }[]
}

const DIARIES: DiarySeed[] = [
  {
    key: 'fairweather', handler: 'handler', trainer: 'trainer', seed: 11, onsetHours: [5, 9],
    stretches: [{ fromDaysAgo: 120, toDaysAgo: 1, everyDays: 5, warnedChance: 0.8, leadMinutes: [55, 190], falseAlertChance: 0.05 }],
    reviews: [
      { nth: 2, comment: 'Good clear nudge; praised and rewarded as practised.' },
      { nth: 5, comment: 'No migraine followed: Juniper may have picked up on the neighbour\'s dog. Keep logging.' },
    ],
    extra: [
      // A migraine that came back: one alert at 06:20, onset at 07:00 and again at 07:30. The alert warns only the
      // first (it used to count for both).
      { kind: 'alert', daysAgo: 33, minute: 6 * 60 + 20 }, { kind: 'episode', daysAgo: 33, minute: 7 * 60 }, { kind: 'episode', daysAgo: 33, minute: 7 * 60 + 30 },
      // Both buttons tapped together as the migraine began: an alert at onset, not a warning (it used to be lead 0).
      { kind: 'episode', daysAgo: 47, minute: 8 * 60 + 10 }, { kind: 'alert', daysAgo: 47, minute: 8 * 60 + 10 },
    ],
  },
  {
    key: 'nakashima', handler: 'h-naka', trainer: 'trainer', seed: 23, onsetHours: [13, 17],
    stretches: [
      { fromDaysAgo: 150, toDaysAgo: 31, everyDays: 7, warnedChance: 0.9, leadMinutes: [80, 200], falseAlertChance: 0.03 },
      { fromDaysAgo: 30, toDaysAgo: 1, everyDays: 4.5, warnedChance: 0.3, leadMinutes: [10, 45], falseAlertChance: 0.08 },
    ],
  },
  {
    key: 'achterberg', handler: 'handler2', trainer: 'trainer2', seed: 37, onsetHours: [6, 10],
    stretches: [{ fromDaysAgo: 28, toDaysAgo: 2, everyDays: 7, warnedChance: 0.75, leadMinutes: [60, 150], falseAlertChance: 0.04 }],
  },
]

const BEHAVIOURS = ['Nudged my hand', 'Pawed at my knee', 'Stared and would not settle', 'Brought the alert toy']
const PLACES = ['Kitchen', 'Living room', 'Bedroom', 'In the car, parked', 'At work']
const ACTIONS = ['Took my medication and lay down in a dark room', 'Took my medication', 'Stopped what I was doing and rested', 'Called my partner']

type Row = typeof s.diaryEntries.$inferInsert

export function diaryRows(today: Date, seedId: (name: string) => string): Row[] {
  const rows: Row[] = []
  for (const d of DIARIES) {
    const random = generator(d.seed)
    const pick = <T>(list: readonly T[]) => list[Math.floor(random() * list.length)]!
    const clientId = seedId(`client:${d.key}`)
    const handlerId = seedId(`user:${d.handler}`)
    let n = 0
    let alertN = 0
    const addAlert = (at: number, reviewedBy?: string) => {
      const review = d.reviews?.find(r => r.nth === alertN)
      rows.push({
        id: seedId(`diary:${d.key}:${n++}`), clientId, kind: 'alert', occurredAt: new Date(at),
        behaviour: pick(BEHAVIOURS), place: pick(PLACES), confidence: random() < 0.7 ? 'sure' : 'fairly-sure',
        createdById: handlerId, createdAt: new Date(at + 3 * MINUTE), updatedAt: new Date(at + 3 * MINUTE),
        ...(review ? { reviewedAt: new Date(at + 2 * DAY), reviewedById: reviewedBy ?? seedId(`user:${d.trainer}`), reviewComment: review.comment } : {}),
      })
      alertN++
    }
    for (const st of d.stretches) {
      // Episodes: one every `everyDays` on average, at a whole minute within the usual hours.
      for (let day = st.fromDaysAgo - Math.floor(random() * st.everyDays); day >= st.toDaysAgo; day -= Math.max(1, Math.round(st.everyDays * (0.6 + random() * 0.8)))) {
        const [h0, h1] = d.onsetHours
        const onset = today.getTime() - day * DAY + (h0 * 60 + Math.floor(random() * (h1 - h0) * 60)) * MINUTE
        if (random() < st.warnedChance) {
          const lead = st.leadMinutes[0] + Math.floor(random() * (st.leadMinutes[1] - st.leadMinutes[0]))
          addAlert(onset - lead * MINUTE)
          // Sometimes the dog alerts again nearer the onset.
          if (random() < 0.3) addAlert(onset - Math.floor(lead / 3) * MINUTE)
        }
        rows.push({
          id: seedId(`diary:${d.key}:${n++}`), clientId, kind: 'episode', occurredAt: new Date(onset),
          severity: pick(['mild', 'moderate', 'moderate', 'severe'] as const), action: pick(ACTIONS), createdById: handlerId,
          createdAt: new Date(onset + 6 * 60 * MINUTE), updatedAt: new Date(onset + 6 * 60 * MINUTE),
        })
      }
      // False alerts: days with an alert and no episode in the next day.
      for (let day = st.fromDaysAgo; day >= st.toDaysAgo; day--) {
        if (random() >= st.falseAlertChance) continue
        const at = today.getTime() - day * DAY + (18 * 60 + Math.floor(random() * 180)) * MINUTE
        const nearEpisode = rows.some(r => r.clientId === clientId && r.kind === 'episode' && Math.abs((r.occurredAt as Date).getTime() - at) < DAY)
        if (!nearEpisode) addAlert(at)
      }
    }
    for (const x of d.extra ?? []) {
      const at = today.getTime() - x.daysAgo * DAY + x.minute * MINUTE
      if (x.kind === 'alert') addAlert(at)
      else {
        rows.push({
          id: seedId(`diary:${d.key}:${n++}`), clientId, kind: 'episode', occurredAt: new Date(at), severity: 'moderate',
          action: 'Took my medication', createdById: handlerId, createdAt: new Date(at + 60 * MINUTE), updatedAt: new Date(at + 60 * MINUTE),
        })
      }
    }
  }
  return rows
}

/** Writes the demo diaries. */
export async function seedDiaries(tx: Tx, today: Date, seedId: (name: string) => string) {
  const rows = diaryRows(today, seedId)
  for (let i = 0; i < rows.length; i += 200) await tx.insert(s.diaryEntries).values(rows.slice(i, i + 200))
}
