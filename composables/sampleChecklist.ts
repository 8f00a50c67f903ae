import type { Exposure, SamplePolicy } from '~/shared/utils/samples'

// The collection checklist as the phone flow asks it: one question per exposure, each answered "not in the time",
// "yes, N minutes before collecting" or "not sure".
export interface ChecklistQuestion { key: Exposure, question: string, limit: (p: SamplePolicy) => number }
export const CHECKLIST_QUESTIONS: ChecklistQuestion[] = [
  { key: 'lastAteAt', question: 'Have you eaten anything?', limit: p => p.fastingMinutes },
  { key: 'lastDrankOtherThanWaterAt', question: 'Have you drunk anything other than water (tea, coffee, juice, milk)?', limit: p => p.fastingMinutes },
  { key: 'lastBrushedTeethAt', question: 'Have you brushed your teeth or used mouthwash?', limit: p => p.fastingMinutes },
  { key: 'lastChewingGumAt', question: 'Have you chewed gum or had a mint?', limit: p => p.fastingMinutes },
  { key: 'lastAlcoholAt', question: 'Have you drunk alcohol?', limit: p => p.fastingMinutes },
  { key: 'lastSmokedAt', question: 'Have you smoked or vaped?', limit: p => p.fastingMinutes },
  { key: 'lastWaterAt', question: 'Have you drunk water?', limit: p => p.waterFreeMinutes },
]

export type ExposureChoice = { choice: 'clear' | 'within' | 'unknown' | null, minutes: number | null }
export const emptyChoices = (): Record<Exposure, ExposureChoice> =>
  Object.fromEntries(CHECKLIST_QUESTIONS.map(q => [q.key, { choice: null, minutes: null }])) as Record<Exposure, ExposureChoice>

/** The answers body for the API: a time (collectedAt − minutes), null ("not in the time") or listed as unknown. */
export function buildAnswers(choices: Record<Exposure, ExposureChoice>, collectedAt: Date, washedHandsUnscented: boolean) {
  const answers: Record<string, unknown> = { washedHandsUnscented, unknown: [] as Exposure[] }
  for (const q of CHECKLIST_QUESTIONS) {
    const c = choices[q.key]
    if (c.choice === 'clear') answers[q.key] = null
    else if (c.choice === 'within' && c.minutes !== null && Number.isFinite(c.minutes) && c.minutes >= 0) {
      answers[q.key] = new Date(collectedAt.getTime() - Math.round(c.minutes) * 60_000).toISOString()
    }
    else (answers.unknown as Exposure[]).push(q.key)
  }
  return answers
}

/** True when the question has an answer the flow can move on from. */
export const answered = (c: ExposureChoice) => c.choice === 'clear' || c.choice === 'unknown' || (c.choice === 'within' && c.minutes !== null && c.minutes >= 0)
