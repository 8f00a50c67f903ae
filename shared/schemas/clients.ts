import { z } from 'zod'
import { CLIENT_STATUSES, CONDITIONS } from '../utils/enums'

export const CLIENT_SORTS = ['household', 'person', 'condition', 'status', 'started', 'updated', 'trainer'] as const

export const clientListQuery = z.object({
  q: z.string().trim().max(100, 'Search with at most 100 characters.').optional(),
  condition: z.enum(CONDITIONS).optional(),
  status: z.enum(CLIENT_STATUSES).optional(),
  trainerId: z.string().max(64).optional(),
  sort: z.enum(CLIENT_SORTS).default('household'),
  dir: z.enum(['asc', 'desc']).default('asc'),
  page: z.coerce.number().int('Page must be a whole number.').min(1, 'Pages start at 1.').max(100000).default(1),
  pageSize: z.coerce.number().int().min(5, 'Show at least 5 rows.').max(200, 'Show at most 200 rows.').default(25),
})
export type ClientListQuery = z.infer<typeof clientListQuery>
