// Second factor for sign-in (TOTP, RFC 6238, with one-time recovery codes): enrolment with a QR code, checking a
// code at sign-in (each code once), turning it off, and the office's rule that all staff must use one.
import { randomBytes } from 'node:crypto'
import { and, eq, isNull, lt, or, sql } from 'drizzle-orm'
import QRCode from 'qrcode'
import { recoveryCodes, users } from '../database/schema'
import { SECURITY_POLICY_DEFAULTS, SECURITY_POLICY_KEY, securityPolicySchema } from '../../shared/schemas/settings-security'
import { matchTotp, newTotpSecret, normaliseRecoveryCode, recoveryCodesFrom, totpUri } from '../../shared/utils/second-factor'
import type { AuthUser } from '../utils/authz'

export async function staffSecondFactorRequired(): Promise<boolean> {
  return (await readSetting(SECURITY_POLICY_KEY, securityPolicySchema, SECURITY_POLICY_DEFAULTS)).staffSecondFactor
}

/** Whether this person must set up a second factor before doing anything else (staff, when the office says so). */
export async function mustEnrolSecondFactor(user: { role: string, totpEnabledAt: Date | null }): Promise<boolean> {
  return user.role !== 'handler' && !user.totpEnabledAt && await staffSecondFactorRequired()
}

export async function secondFactorStatus(user: AuthUser) {
  const [row] = await useDb().select({ enabledAt: users.totpEnabledAt }).from(users).where(eq(users.id, user.id))
  const left = await useDb().select({ n: sql<number>`count(*)` }).from(recoveryCodes).where(and(eq(recoveryCodes.userId, user.id), isNull(recoveryCodes.usedAt)))
  return {
    enabled: !!row?.enabledAt,
    enabledAt: row?.enabledAt ?? null,
    required: user.role !== 'handler' && await staffSecondFactorRequired(),
    recoveryCodesLeft: Number(left[0]?.n ?? 0),
  }
}

/** A fresh secret waiting for its first code: the QR code (a PNG data URL) and the secret to type by hand. */
export async function startSecondFactorEnrolment(user: AuthUser) {
  const secret = newTotpSecret()
  await useDb().update(users).set({ totpPendingSecret: sealSecret(secret) }).where(eq(users.id, user.id))
  const uri = totpUri(secret, user.email)
  // Error correction M and a quiet zone of 4 modules (ISO/IEC 18004 defaults, from memory).
  const qrCode = await QRCode.toDataURL(uri, { errorCorrectionLevel: 'M', margin: 4, width: 240 })
  return { secret, uri, qrCode }
}

const codeRefused = () => createError({
  statusCode: 422, statusMessage: 'Unprocessable Content',
  message: 'That code does not match. Check the time on your phone is set automatically, then enter the code shown now.',
  data: { fieldErrors: { code: 'That code does not match. Enter the code shown now.' } },
})

/** Proves the pending secret with a code, turns the second factor on and returns new recovery codes (shown once). */
export async function confirmSecondFactorEnrolment(user: AuthUser, code: string): Promise<string[]> {
  const [row] = await useDb().select({ pending: users.totpPendingSecret }).from(users).where(eq(users.id, user.id))
  if (!row?.pending) throw createError({ statusCode: 409, statusMessage: 'Conflict', message: 'Start the set-up again: no code is waiting to be confirmed.' })
  const step = matchTotp(openSecret(row.pending), code, Date.now(), null)
  if (step === null) throw codeRefused()
  const codes = recoveryCodesFrom(randomBytes(100))
  await useDb().transaction(async (tx) => {
    await tx.update(users).set({ totpSecret: row.pending, totpPendingSecret: null, totpEnabledAt: new Date(), totpLastStep: step }).where(eq(users.id, user.id))
    await tx.delete(recoveryCodes).where(eq(recoveryCodes.userId, user.id))
    await tx.insert(recoveryCodes).values(codes.map(c => ({ userId: user.id, codeHash: hashToken(normaliseRecoveryCode(c)) })))
    await logAudit(tx, { actorId: user.id, action: 'second-factor.enabled', entityType: 'user', entityId: user.id })
  })
  return codes
}

/** Turns the second factor off after checking the password; refused while the office requires it for staff. */
export async function turnOffSecondFactor(user: AuthUser, password: string) {
  const [row] = await useDb().select().from(users).where(eq(users.id, user.id))
  if (!row?.passwordHash || !await verifyPassword(row.passwordHash, password)) {
    throw createError({ statusCode: 422, statusMessage: 'Unprocessable Content', message: 'That is not your current password.', data: { fieldErrors: { password: 'That is not your current password.' } } })
  }
  if (user.role !== 'handler' && await staffSecondFactorRequired()) {
    throw createError({ statusCode: 409, statusMessage: 'Conflict', message: 'The office requires a second factor for all staff, so it cannot be turned off. To move it to a new phone, set it up again.' })
  }
  await useDb().transaction(async (tx) => {
    await tx.update(users).set({ totpSecret: null, totpPendingSecret: null, totpEnabledAt: null, totpLastStep: null }).where(eq(users.id, user.id))
    await tx.delete(recoveryCodes).where(eq(recoveryCodes.userId, user.id))
    await logAudit(tx, { actorId: user.id, action: 'second-factor.disabled', entityType: 'user', entityId: user.id })
  })
}

/**
 * Checks a sign-in's second step: a code from the app (each time step accepted once, recorded with a guarded
 * update so two requests cannot both use it) or an unused recovery code (marked used). True when accepted.
 */
export async function verifySecondFactor(userId: string, input: { code: string } | { recoveryCode: string }): Promise<boolean> {
  const db = useDb()
  if ('recoveryCode' in input) {
    const used = await db.update(recoveryCodes).set({ usedAt: new Date() })
      .where(and(eq(recoveryCodes.userId, userId), eq(recoveryCodes.codeHash, hashToken(normaliseRecoveryCode(input.recoveryCode))), isNull(recoveryCodes.usedAt)))
      .returning({ id: recoveryCodes.id })
    return used.length === 1
  }
  const [row] = await db.select({ secret: users.totpSecret, lastStep: users.totpLastStep }).from(users).where(eq(users.id, userId))
  if (!row?.secret) return false
  const step = matchTotp(openSecret(row.secret), input.code, Date.now(), row.lastStep)
  if (step === null) return false
  const taken = await db.update(users).set({ totpLastStep: step })
    .where(and(eq(users.id, userId), or(isNull(users.totpLastStep), lt(users.totpLastStep, step))))
    .returning({ id: users.id })
  return taken.length === 1
}

/**
 * The office clears someone's second factor (a lost phone and lost recovery codes): their sessions end, and they
 * sign in with the password and set it up again (at once, when the office requires it). Never one's own.
 */
export async function resetSecondFactorOf(admin: AuthUser, userId: string) {
  if (userId === admin.id) {
    throw createError({ statusCode: 422, statusMessage: 'Unprocessable Content', message: 'You cannot reset your own second factor here. Use your account page, or ask another admin.' })
  }
  return useDb().transaction(async (tx) => {
    const [row] = await tx.update(users).set({ totpSecret: null, totpPendingSecret: null, totpEnabledAt: null, totpLastStep: null })
      .where(eq(users.id, userId)).returning({ id: users.id, email: users.email })
    if (!row) notFound('account')
    await tx.delete(recoveryCodes).where(eq(recoveryCodes.userId, userId))
    await endAllSessions(tx, userId)
    await logAudit(tx, { actorId: admin.id, action: 'second-factor.reset', entityType: 'user', entityId: userId })
    return { id: row.id, secondFactor: false }
  })
}
