// The homework upload policy: the largest video a handler may send, and how long an interrupted upload is kept
// for resuming before it is removed.
import { z } from 'zod'
import { numeric } from './common'
import { defineSetting } from './settings'
import { DEFAULT_MAX_UPLOAD_MEGABYTES, DEFAULT_STALE_UPLOAD_HOURS } from '../utils/homework-video'

export const homeworkUploadPolicySchema = z.object({
  maxUploadMegabytes: numeric(z.number({ invalid_type_error: 'Enter the size in megabytes as a number.' })
    .int('Use whole megabytes.').min(1, 'Use at least 1 MB.').max(20 * 1024, 'Use at most 20480 MB (20 GB).')),
  staleUploadHours: numeric(z.number({ invalid_type_error: 'Enter the hours as a number.' })
    .int('Use whole hours.').min(1, 'Use at least 1 hour.').max(24 * 14, 'Use at most 336 hours (two weeks).')),
})
export type HomeworkUploadPolicy = z.infer<typeof homeworkUploadPolicySchema>

export const HOMEWORK_UPLOAD_POLICY_KEY = 'homework-uploads'
export const HOMEWORK_UPLOAD_POLICY_DEFAULTS: HomeworkUploadPolicy = {
  // 2048 MB = 2 GiB: the requirement ("default 2 GB").
  maxUploadMegabytes: DEFAULT_MAX_UPLOAD_MEGABYTES,
  // A day without progress (common practice), see DEFAULT_STALE_UPLOAD_HOURS.
  staleUploadHours: DEFAULT_STALE_UPLOAD_HOURS,
}

export const homeworkUploadPolicy = defineSetting(HOMEWORK_UPLOAD_POLICY_KEY, {
  label: 'Homework videos',
  description: 'The largest homework video a handler may send (1024 MB = 1 GB), and how many hours an interrupted upload with no progress is kept for resuming before it is removed.',
  schema: homeworkUploadPolicySchema,
  defaults: HOMEWORK_UPLOAD_POLICY_DEFAULTS,
  fieldLabels: {
    maxUploadMegabytes: 'Largest video (MB)',
    staleUploadHours: 'Keep a stalled upload for (hours)',
  },
})
