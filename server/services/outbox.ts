import { and, asc, eq, gt, isNull, lte, sql } from 'drizzle-orm'
import { invitations, outbox, passwordResets } from '../database/schema'
import type { EmailContent } from '../utils/mail'

/**
 * An attachment by reference: the outbox stores what to attach, never the bytes, and renders it when the message is
 * sent (an issued invoice does not change, so the PDF sent is the invoice as issued; a rendering failure leaves the
 * message queued and retried like any sending failure).
 */
export interface OutboxAttachment { kind: 'invoice-pdf' | 'receipt-pdf' | 'appointment-ics', id: string }
/** A single-use link in the message, by reference: its token is minted at sending (see SECRET_LINK_TOKEN). */
export interface OutboxSecretLink { kind: 'password-reset' | 'invitation', id: string }
export interface QueuedEmail extends EmailContent { to: string, dedupeKey?: string, attachments?: OutboxAttachment[], secretLink?: OutboxSecretLink }

/**
 * Mints the link's token now and stores only its hash on the reset or invitation row (replacing any earlier one, so
 * only the link in the message being sent works). Null when the link was revoked, used or expired meanwhile.
 */
async function mintSecretLinkToken(link: OutboxSecretLink): Promise<string | null> {
  const { token, hash } = newToken()
  const db = useDb()
  const now = new Date()
  const updated = link.kind === 'password-reset'
    ? await db.update(passwordResets).set({ tokenHash: hash }).where(and(eq(passwordResets.id, link.id), isNull(passwordResets.usedAt), isNull(passwordResets.revokedAt), gt(passwordResets.expiresAt, now))).returning({ id: passwordResets.id })
    : await db.update(invitations).set({ tokenHash: hash }).where(and(eq(invitations.id, link.id), isNull(invitations.acceptedAt), isNull(invitations.revokedAt), gt(invitations.expiresAt, now))).returning({ id: invitations.id })
  return updated.length ? token : null
}

async function renderAttachments(list: OutboxAttachment[] | null) {
  if (!list?.length) return undefined
  return Promise.all(list.map(async (a) => {
    if (a.kind === 'invoice-pdf') return invoicePdfAttachment(a.id)
    if (a.kind === 'receipt-pdf') return receiptPdfAttachment(a.id)
    if (a.kind === 'appointment-ics') return appointmentIcsAttachment(a.id)
    throw new Error(`Unknown attachment kind ${String((a as { kind: string }).kind)}`)
  }))
}

/**
 * Writes an e-mail to the outbox inside the caller's transaction: it is sent only if the change commits,
 * and it is never lost once committed. A dedupeKey makes it a once-only message.
 */
export async function queueEmail(tx: DbOrTx, mail: QueuedEmail) {
  await tx.insert(outbox).values({
    toAddress: mail.to,
    subject: mail.subject,
    textBody: mail.text,
    htmlBody: mail.html,
    dedupeKey: mail.dedupeKey ?? null,
    attachments: mail.attachments?.length ? mail.attachments : null,
    secretLink: mail.secretLink ?? null,
  }).onConflictDoNothing({ target: outbox.dedupeKey })
  scheduleOutboxRun()
}

// Retry back-off: 5 s doubling to at most 15 min (common practice for mail queues).
export function retryDelayMs(attempts: number) {
  return Math.min(5000 * 2 ** Math.max(0, attempts - 1), 15 * 60 * 1000)
}
// While one instance sends a message, others leave it alone for this long.
const LEASE_MS = 60_000

let running: Promise<number> | null = null
let timer: ReturnType<typeof setTimeout> | null = null

export function scheduleOutboxRun(delayMs = 50) {
  // An instance with OUTBOX_WORKER=off never sends (another instance does), not even right after queueing.
  if (timer || process.env.OUTBOX_WORKER === 'off') return
  timer = setTimeout(() => {
    timer = null
    void deliverDueEmails().catch(err => logEvent('mail.run-failed', { err: String((err as Error)?.message ?? err) }, 'error'))
  }, delayMs)
}

/** Sends every due message once; failures stay queued with a later attempt time. Returns how many went out. */
export function deliverDueEmails(limit = 25): Promise<number> {
  running ??= (async () => {
    try {
      const db = useDb()
      const now = Date.now()
      const due = await db.select().from(outbox)
        .where(and(eq(outbox.status, 'pending'), lte(outbox.nextAttemptAt, new Date(now))))
        .orderBy(asc(outbox.nextAttemptAt)).limit(limit)
      let sent = 0
      const { from } = smtpSettings()
      for (const row of due) {
        // Claim the row: only the instance whose update matched sends it.
        const claimed = await db.update(outbox).set({ nextAttemptAt: new Date(now + LEASE_MS) })
          .where(and(eq(outbox.id, row.id), eq(outbox.status, 'pending'), lte(outbox.nextAttemptAt, new Date(now))))
          .returning({ id: outbox.id })
        if (!claimed.length) continue
        try {
          let { textBody: text, htmlBody: html } = row
          if (row.secretLink) {
            const token = await mintSecretLinkToken(row.secretLink)
            if (!token) {
              logEvent('mail.link-withdrawn', { outboxId: row.id, kind: row.secretLink.kind })
              // A newer link replaced this one (or it expired or was used) before it went out: sending it would only mislead.
              await db.update(outbox).set({ status: 'failed', lastError: 'The single-use link was replaced, used or expired before it could be sent.' }).where(eq(outbox.id, row.id))
              continue
            }
            text = text.replaceAll(SECRET_LINK_TOKEN, token)
            html = html?.replaceAll(SECRET_LINK_TOKEN, token) ?? null
          }
          const attachments = await renderAttachments(row.attachments)
          await useMailer().sendMail({ from, to: row.toAddress, subject: row.subject, text, html: html ?? undefined, attachments })
          await db.update(outbox).set({ status: 'sent', sentAt: new Date(), attempts: sql`${outbox.attempts} + 1`, lastError: null }).where(eq(outbox.id, row.id))
          sent++
        }
        catch (err) {
          const attempts = row.attempts + 1
          logEvent('mail.failed', { outboxId: row.id, attempts, err: String((err as Error)?.message ?? err).slice(0, 300) }, 'warn')
          await db.update(outbox).set({
            attempts,
            lastError: String((err as Error)?.message ?? err).slice(0, 500),
            nextAttemptAt: new Date(Date.now() + retryDelayMs(attempts)),
          }).where(eq(outbox.id, row.id))
        }
      }
      return sent
    }
    finally {
      running = null
    }
  })()
  return running
}
