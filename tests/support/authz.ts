// Shared shapes for the authorization matrix (tests/integration/authz-matrix.test.ts). Each feature keeps its rows in
// tests/integration/authz-rows/<feature>.ts, exporting `rows`.
import { expect } from 'vitest'
import type { ApiResponse } from './http'
import { ADMIN, HANDLER_A, HANDLER_B, TRAINER_A, TRAINER_B } from './people'

export type Actor = 'anonymous' | 'handlerA' | 'handlerB' | 'trainerA' | 'trainerB' | 'admin'
export const ACTORS: Record<Actor, string | null> = {
  anonymous: null, handlerA: HANDLER_A, handlerB: HANDLER_B, trainerA: TRAINER_A, trainerB: TRAINER_B, admin: ADMIN,
}
export type Expectation = number | { status: number, check: (res: ApiResponse) => void }

/** What the row's request needs: ids created for it by `prepare`, keyed by name. */
export type Ctx = Record<string, string>

export interface Row {
  route: string // "METHOD /api/path/[param]", as the file lays it out
  /** The request's method when the route file takes several ("ALL …", e.g. the tus upload endpoint). */
  method?: string
  path: string | ((actor: Actor, ctx: Ctx) => string)
  body?: unknown | ((actor: Actor, ctx: Ctx) => unknown)
  /** Raw body and content type instead of JSON (uploads). */
  raw?: (actor: Actor, ctx: Ctx) => { body: BodyInit, contentType?: string, headers?: Record<string, string> }
  expect: Record<Actor, Expectation>
  /** The row changes data: the database is reseeded before each of its requests. */
  mutates?: boolean
  /** Runs (as admin, after any reseed) before the request, to create what it needs; returns ids for path/body. */
  prepare?: (admin: import('./http').Agent) => Promise<Ctx>
}

export const everyone = (status: number): Record<Actor, number> => ({ anonymous: status, handlerA: status, handlerB: status, trainerA: status, trainerB: status, admin: status })
export const signedIn = (status: number): Record<Actor, number> => ({ ...everyone(status), anonymous: 401 })
export const adminOnly = (status: number): Record<Actor, number> => ({ anonymous: 401, handlerA: 403, handlerB: 403, trainerA: 403, trainerB: 403, admin: status })
/** For a resource of client A: its handler and trainer and the admin get `ok`; the others a 404. */
export const clientA = (ok: number, handlerA = ok): Record<Actor, number> => ({ anonymous: 401, handlerA, handlerB: 404, trainerA: ok, trainerB: 404, admin: ok })
export const ids = (res: ApiResponse) => (res.body.rows as { id: string }[]).map(r => r.id)
export { expect }

/** Every row of tests/integration/authz-rows/*.ts, in file order. */
export async function loadRows(): Promise<Row[]> {
  const { readdirSync } = await import('node:fs')
  const { join, resolve } = await import('node:path')
  const dir = resolve(import.meta.dirname, '../integration/authz-rows')
  const rows: Row[] = []
  for (const f of readdirSync(dir).filter(f => f.endsWith('.ts')).sort()) {
    rows.push(...((await import(join(dir, f))) as { rows: Row[] }).rows)
  }
  return rows
}
