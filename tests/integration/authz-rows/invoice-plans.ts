import { seedId } from '../../../scripts/lib/seed-data'
import { adminOnly, expect, type Row } from '../../support/authz'

// Fee schedules, plan invoices, the invoice job run by hand and revenue: the office only.
const TEMPLATE = seedId('template:default')
const LINDGREN = seedId('client:lindgren') // seeded without plan invoices
const schedule = { currency: 'GBP', taxRateBasisPoints: 2000, depositMinor: 50000, instalmentCount: 4, intervalMonths: 1, lines: [{ description: 'Placement programme', unitMinor: 170000 }] }

export const rows: Row[] = [
  { route: 'GET /api/fee-schedules', path: '/api/fee-schedules', expect: { ...adminOnly(200), admin: { status: 200, check: r => expect(r.body.rows.some((x: any) => x.id === TEMPLATE && x.schedule)).toBe(true) } } },
  { route: 'PUT /api/fee-schedules/[id]', path: `/api/fee-schedules/${TEMPLATE}`, body: schedule, mutates: true, expect: adminOnly(200) },
  { route: 'POST /api/clients/[id]/plan-invoices', path: `/api/clients/${LINDGREN}/plan-invoices`, body: { templateId: TEMPLATE, startDate: '2026-01-15' }, mutates: true, expect: adminOnly(201) },
  { route: 'POST /api/invoices/run-schedule', path: '/api/invoices/run-schedule', mutates: true, expect: adminOnly(200) },
  { route: 'GET /api/invoices/revenue', path: '/api/invoices/revenue', expect: { ...adminOnly(200), admin: { status: 200, check: r => expect(r.body.months).toHaveLength(12) } } },
]
