import type { ClientStatus } from './enums'

// The household-level stages of a placement programme, in order (common practice), with what they mean for the
// handler. The detailed milestones inside training come with programme templates.
export const STAGE_STEPS: { status: ClientStatus, label: string, handlerText: string }[] = [
  { status: 'intake', label: 'Intake', handlerText: 'Your trainer is getting to know you and your dog and checking the dog is suited to the work.' },
  { status: 'active', label: 'Training', handlerText: 'Your dog is learning to recognise the scent of an episode and to alert you. Most of the daily work happens at home.' },
  { status: 'placed', label: 'Placed', handlerText: 'Your dog is working with you day to day. Keep logging real alerts and episodes so the trainer can follow its reliability.' },
  { status: 'aftercare', label: 'Aftercare', handlerText: 'Your dog is placed; your trainer checks in regularly and re-assesses once a year.' },
]

/** Where a household stands: the index of its stage (or -1 when closed) and how many stages there are. */
export function stageProgress(status: ClientStatus): { index: number, total: number, label: string, handlerText: string } {
  const index = STAGE_STEPS.findIndex(s => s.status === status)
  if (index < 0) return { index: -1, total: STAGE_STEPS.length, label: 'Closed', handlerText: 'This programme is closed. Your records stay available to read.' }
  return { index, total: STAGE_STEPS.length, label: STAGE_STEPS[index]!.label, handlerText: STAGE_STEPS[index]!.handlerText }
}
