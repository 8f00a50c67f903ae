import type { H3Event } from 'h3'
import { and, eq, gt, isNull, sql } from 'drizzle-orm'
import { clientHandlers, clients, invitations, passwordResets, users } from '../database/schema'
import type { InvitationInput } from '../../shared/schemas/auth'
import type { AuthUser } from '../utils/authz'
import type { Tx } from '../utils/db'

type UserRow = typeof users.$inferSelect

export function toAuthUser(u: Pick<UserRow, 'id' | 'role' | 'name' | 'email' | 'timeZone'>): AuthUser {
  return { id: u.id, role: u.role, name: u.name, email: u.email, timeZone: u.timeZone }
}

/** The cookie lives as long as the absolute session limit (the database check ends it sooner when due). */
export function sessionCookieConfig() {
  return { maxAge: Number(useRuntimeConfig().sessionAbsoluteSeconds) }
}

/** Seals a fresh session cookie for this user at their current session version. */
export async function startSession(event: H3Event, user: UserRow) {
  const now = Date.now()
  await replaceUserSession(event, { user: toAuthUser(user), sv: user.sessionVersion, issuedAt: now, seenAt: now }, sessionCookieConfig())
}

/** Ends every session of the user at once (all devices) by raising the version sealed in their cookies. */
export async function endAllSessions(tx: DbOrTx, userId: string) {
  await tx.update(users).set({ sessionVersion: sql`${users.sessionVersion} + 1` }).where(eq(users.id, userId))
}

// The second step of a sign-in may be taken within 5 minutes of the password (common practice).
const SECOND_FACTOR_STEP_MS = 5 * 60 * 1000

/** Remembers, in the sealed cookie, that this person's password was right and a second factor is awaited. */
export async function askForSecondFactor(event: H3Event, user: UserRow) {
  await replaceUserSession(event, { pendingSecondFactor: { userId: user.id, sv: user.sessionVersion, until: Date.now() + SECOND_FACTOR_STEP_MS } }, sessionCookieConfig())
  logEvent('auth.second-factor.asked', { userId: user.id, role: user.role }, 'info', event)
}

/** The end of every successful sign-in: recorded, the account's failures forgotten, the session started. */
export async function finishSignIn(event: H3Event, user: UserRow, counters: Array<[ThrottleName, string]>) {
  await useDb().transaction(async (tx) => {
    await tx.update(users).set({ lastSignInAt: new Date() }).where(eq(users.id, user.id))
    await logAudit(tx, { actorId: user.id, action: 'signed-in', entityType: 'user', entityId: user.id })
  })
  // The owner got in: forget this account's failures (the per-address counter stays, it guards other accounts).
  await clearAttempts(counters.filter(([name]) => name !== 'signInAddress'))
  logEvent('auth.sign-in.succeeded', { userId: user.id, role: user.role }, 'info', event)
  await startSession(event, user)
}

// A real hash to compare against when the e-mail is unknown, so timing does not reveal which e-mails exist.
let dummyHash: Promise<string> | undefined

export async function verifyCredentials(email: string, password: string): Promise<UserRow | null> {
  const [user] = await useDb().select().from(users).where(eq(users.email, email)).limit(1)
  if (!user || !user.passwordHash) {
    dummyHash ??= hashPassword('not-a-real-password-0000')
    await verifyPassword(await dummyHash, password)
    return null
  }
  const ok = await verifyPassword(user.passwordHash, password)
  if (!ok || user.disabledAt) return null
  return user
}

export async function createInvitation(inviter: AuthUser, input: InvitationInput) {
  return useDb().transaction(tx => createInvitationIn(tx, inviter, input))
}

/** Writes an invitation and its e-mail inside the caller's transaction. */
export async function createInvitationIn(tx: Tx, inviter: AuthUser, input: InvitationInput) {
  // Stored until the e-mail is sent with a hash of a secret nobody holds: the link's real token is minted at sending.
  const { hash } = newToken()
  const [existing] = await tx.select({ id: users.id, role: users.role }).from(users).where(eq(users.email, input.email)).limit(1)
  if (existing && input.role === 'trainer') {
    throw createError({ statusCode: 409, statusMessage: 'Conflict', message: `${input.email} already has an account.` })
  }
  if (existing && existing.role !== 'handler') {
    throw createError({ statusCode: 409, statusMessage: 'Conflict', message: `${input.email} belongs to a staff account and cannot be a handler.` })
  }
  // A new invitation replaces the open ones to the same person for the same place: only the latest link works.
  await tx.update(invitations).set({ revokedAt: new Date() }).where(and(
    eq(invitations.email, input.email), isNull(invitations.acceptedAt), isNull(invitations.revokedAt),
    input.role === 'handler' ? eq(invitations.clientId, input.clientId) : isNull(invitations.clientId),
  ))
  const [row] = await tx.insert(invitations).values({
    tokenHash: hash,
    email: input.email,
    name: input.name,
    role: input.role,
    clientId: input.role === 'handler' ? input.clientId : null,
    relationship: input.role === 'handler' ? input.relationship : null,
    invitedById: inviter.id,
    expiresAt: new Date(Date.now() + INVITATION_TTL_MS),
  }).returning()
  const clientName = input.role === 'handler'
    ? (await tx.select({ n: clients.householdName }).from(clients).where(eq(clients.id, input.clientId)))[0]?.n
    : undefined
  await queueEmail(tx, {
    to: input.email,
    ...composeEmail({
      subject: input.role === 'trainer' ? 'You are invited to join Forescent as a trainer' : `You are invited to the ${clientName} programme on Forescent`,
      greeting: `Hello ${input.name},`,
      paragraphs: input.role === 'trainer'
        ? [`${inviter.name} has invited you to work as a trainer on Forescent.`, 'Open the link below to choose your password. The link works once and expires in 7 days.']
        : [`${inviter.name} has invited you to the training programme of ${clientName}.`, 'On Forescent you will log sample collections, homework sessions and real alerts, and see your dog\'s progress.', 'Open the link below to choose your password. The link works once and expires in 7 days.'],
      action: { label: 'Accept the invitation', url: appUrl(`/invitation/${SECRET_LINK_TOKEN}`) },
    }),
    secretLink: { kind: 'invitation', id: row!.id },
  })
  await logAudit(tx, { actorId: inviter.id, action: 'invitation.created', entityType: 'invitation', entityId: row!.id, clientId: row!.clientId, data: { email: input.email, name: input.name, role: input.role } })
  return { invitation: row! }
}

export async function findOpenInvitation(token: string) {
  const [row] = await useDb().select().from(invitations).where(and(
    eq(invitations.tokenHash, hashToken(token)),
    isNull(invitations.acceptedAt), isNull(invitations.revokedAt), gt(invitations.expiresAt, new Date()),
  )).limit(1)
  return row ?? null
}

const invitationGone = () => createError({ statusCode: 404, statusMessage: 'Not Found', message: 'This invitation link has expired or was already used. Ask your trainer or the office for a new one.' })

/**
 * Accepts an invitation: creates the account, or, for a handler who already has one (a second household),
 * checks their existing password and adds the client file. The link is marked used in the same transaction.
 */
export async function acceptInvitation(token: string, password: string, name?: string): Promise<UserRow> {
  const invitation = await findOpenInvitation(token)
  if (!invitation) throw invitationGone()
  const [existing] = await useDb().select().from(users).where(eq(users.email, invitation.email)).limit(1)
  if (existing && (existing.role !== invitation.role || existing.disabledAt)) {
    throw createError({ statusCode: 409, statusMessage: 'Conflict', message: 'This e-mail already has a different account. Ask the office to help.' })
  }
  if (existing && !(existing.passwordHash && await verifyPassword(existing.passwordHash, password))) {
    throw createError({ statusCode: 422, statusMessage: 'Unprocessable Content', message: 'You already have a Forescent account with this e-mail: enter its password to add this household.', data: { fieldErrors: { password: 'Enter the password of your existing Forescent account.' } } })
  }
  const passwordHash = existing ? null : await hashPassword(password)
  return useDb().transaction(async (tx) => {
    const used = await tx.update(invitations).set({ acceptedAt: new Date() })
      .where(and(eq(invitations.id, invitation.id), isNull(invitations.acceptedAt))).returning({ id: invitations.id })
    if (!used.length) throw invitationGone()
    const user = existing
      ?? (await tx.insert(users).values({ email: invitation.email, name: name || invitation.name, role: invitation.role, passwordHash }).returning())[0]!
    if (invitation.role === 'handler' && invitation.clientId) {
      await tx.insert(clientHandlers).values({ clientId: invitation.clientId, userId: user.id, relationship: invitation.relationship ?? 'self' }).onConflictDoNothing()
    }
    await logAudit(tx, { actorId: user.id, action: 'invitation.accepted', entityType: 'invitation', entityId: invitation.id, clientId: invitation.clientId })
    return user
  })
}

/**
 * Queues a reset link for the account with this e-mail, if there is one. Only the newest link works: asking again
 * revokes the older ones. The token is minted when the e-mail is sent (secretLink), so the database never holds it.
 */
export async function requestPasswordReset(email: string): Promise<boolean> {
  const [user] = await useDb().select().from(users).where(eq(users.email, email)).limit(1)
  if (!user || user.disabledAt || !user.passwordHash) return false
  const { hash } = newToken()
  await useDb().transaction(async (tx) => {
    await tx.update(passwordResets).set({ revokedAt: new Date() })
      .where(and(eq(passwordResets.userId, user.id), isNull(passwordResets.usedAt), isNull(passwordResets.revokedAt)))
    const [reset] = await tx.insert(passwordResets).values({ userId: user.id, tokenHash: hash, expiresAt: new Date(Date.now() + PASSWORD_RESET_TTL_MS) }).returning({ id: passwordResets.id })
    await queueEmail(tx, {
      to: user.email,
      ...composeEmail({
        subject: 'Reset your Forescent password',
        greeting: `Hello ${user.name},`,
        paragraphs: ['Someone asked to reset the password of your Forescent account. If it was you, open the link below within one hour.', 'If it was not you, ignore this e-mail: your password stays as it is.'],
        action: { label: 'Choose a new password', url: appUrl(`/reset-password?token=${SECRET_LINK_TOKEN}`) },
      }),
      secretLink: { kind: 'password-reset', id: reset!.id },
    })
  })
  return true
}

export async function resetPassword(token: string, password: string): Promise<UserRow> {
  const passwordHash = await hashPassword(password)
  return useDb().transaction(async (tx) => {
    const [reset] = await tx.update(passwordResets).set({ usedAt: new Date() }).where(and(
      eq(passwordResets.tokenHash, hashToken(token)), isNull(passwordResets.usedAt), isNull(passwordResets.revokedAt),
      gt(passwordResets.expiresAt, new Date()),
    )).returning()
    if (!reset) throw createError({ statusCode: 400, statusMessage: 'Bad Request', message: 'This reset link has expired or was already used. Ask for a new one from the sign-in page.' })
    const [user] = await tx.update(users).set({ passwordHash, sessionVersion: sql`${users.sessionVersion} + 1` })
      .where(eq(users.id, reset.userId)).returning()
    if (!user || user.disabledAt) throw createError({ statusCode: 400, statusMessage: 'Bad Request', message: 'This account is disabled. Contact the office.' })
    await logAudit(tx, { actorId: user.id, action: 'password.reset', entityType: 'user', entityId: user.id })
    return user
  })
}
