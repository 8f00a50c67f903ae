import type { H3Event } from 'h3'
import { and, eq, inArray, type SQL } from 'drizzle-orm'
import type { Role } from '../../shared/utils/enums'
import { clientHandlers, clients } from '../database/schema'

// The one authorization module: every route asks here, never the page.
export interface AuthUser { id: string, role: Role, name: string, email: string, timeZone: string }

// What a staff member who must first set up a second factor may still reach: their account and signing out.
const ENROLMENT_PATHS = /^\/api\/(account\/|auth\/)/

export function requireUser(event: H3Event): AuthUser {
  const user = event.context.authUser as AuthUser | undefined
  if (!user) throw createError({ statusCode: 401, statusMessage: 'Unauthorized', message: 'Please sign in to continue.' })
  if (event.context.mustEnrolSecondFactor && !ENROLMENT_PATHS.test(event.path)) {
    throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: 'The office requires a second factor for every staff account. Set it up on your account page first.', data: { secondFactorRequired: true } })
  }
  return user
}

export function requireRole(event: H3Event, ...roles: Role[]): AuthUser {
  const user = requireUser(event)
  if (!roles.includes(user.role)) {
    throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: 'Your account does not have access to this.' })
  }
  return user
}

/** The WHERE condition limiting the clients table to what this user may see (undefined: everything). */
export function clientScope(user: AuthUser): SQL | undefined {
  if (user.role === 'admin') return undefined
  if (user.role === 'trainer') return eq(clients.trainerId, user.id)
  const db = useDb()
  return inArray(clients.id, db.select({ id: clientHandlers.clientId }).from(clientHandlers).where(eq(clientHandlers.userId, user.id)))
}

export function notFound(what = 'client file'): never {
  throw createError({ statusCode: 404, statusMessage: 'Not Found', message: `No ${what} was found with that id, or it is not one of yours.` })
}

/**
 * Loads a client the user may see, or answers 404: the same answer for "does not exist" and "not yours".
 * With `write` or `staff`, handlers are refused (they read their file and edit only its contact details).
 */
export async function requireClientAccess(event: H3Event, clientId: string, opts: { write?: boolean, staff?: boolean } = {}) {
  const user = requireUser(event)
  const scope = clientScope(user)
  const [client] = await useDb().select().from(clients).where(and(eq(clients.id, clientId), scope)).limit(1)
  if (!client) notFound()
  if (opts.write && user.role === 'handler') {
    throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: 'Only the trainer can change this client file.' })
  }
  if (opts.staff && user.role === 'handler') {
    throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: 'This part of the file is for the trainer and the office.' })
  }
  return { user, client }
}
