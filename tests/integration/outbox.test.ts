// The outbox keeps an e-mail while the SMTP server is down and delivers it, once, when the server comes back.
import { readFileSync } from 'node:fs'
import { resolve } from 'node:path'
import { createClient } from '@libsql/client'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { startFakeSmtp, type FakeSmtp } from '../../fake-services/smtp/server.mjs'
import { Agent, inbox, linkIn, waitForMail } from '../support/http'
import { HANDLER_A } from '../support/people'
import { ROOT, startStack, type Stack } from '../support/stack'

interface OutboxRow { id: number, status: string, attempts: number, last_error: string | null, next_attempt_at: number, sent_at: number | null }

let stack: Stack
// The server's JSON log: each failed sending is a "mail.failed" line (the security and operations log).
const logFile = resolve(ROOT, `tests/.tmp/outbox-server-${Date.now()}.log`)
let smtp: FakeSmtp | undefined

beforeAll(async () => {
  // startSmtp: false: stack.smtpPort was free when chosen and nothing listens on it.
  stack = await startStack({ label: 'outbox', startSmtp: false, logFile })
})
afterAll(async () => {
  await stack?.stop()
  await smtp?.close()
})

async function rowsFor(to: string): Promise<OutboxRow[]> {
  const db = createClient({ url: stack.databaseUrl })
  try {
    const res = await db.execute({ sql: 'SELECT id, status, attempts, last_error, next_attempt_at, sent_at FROM outbox WHERE to_address = ?', args: [to] })
    return res.rows.map(r => ({
      id: Number(r.id), status: String(r.status), attempts: Number(r.attempts), last_error: r.last_error === null ? null : String(r.last_error),
      next_attempt_at: Number(r.next_attempt_at), sent_at: r.sent_at === null ? null : Number(r.sent_at),
    }))
  }
  finally { db.close() }
}

async function pollRow(to: string, done: (r: OutboxRow) => boolean, timeoutMs: number): Promise<OutboxRow> {
  const deadline = Date.now() + timeoutMs
  for (;;) {
    const [row] = await rowsFor(to)
    if (row && done(row)) return row
    if (Date.now() > deadline) throw new Error(`Outbox row for ${to} did not reach the expected state in ${timeoutMs} ms: ${JSON.stringify(row)}`)
    await new Promise(r => setTimeout(r, 100))
  }
}

describe('outbox delivery', () => {
  it('retries while SMTP is down, then delivers exactly one message', async () => {
    const res = await new Agent(stack.baseUrl).post('/api/auth/forgot-password', { email: HANDLER_A })
    expect(res.status).toBe(200)

    // The first attempt fails (connection refused); the message stays queued with the error.
    const failed = await pollRow(HANDLER_A, r => r.attempts >= 1, 5_000)
    const seenAt = Date.now()
    expect(failed.status).toBe('pending')
    expect(failed.last_error).toMatch(/ECONNREFUSED|connect/i)
    expect(failed.sent_at).toBeNull()
    // The next try waits: the app's back-off starts at 5 s (server/services/outbox.ts, marked common practice there).
    expect(failed.next_attempt_at - seenAt).toBeGreaterThan(3_000)
    expect(failed.next_attempt_at - seenAt).toBeLessThanOrEqual(5_100)
    expect(await rowsFor(HANDLER_A)).toHaveLength(1)
    const mailFailures = () => readFileSync(logFile, 'utf8').split('\n').filter(l => l.includes('"event":"mail.failed"')).map(l => JSON.parse(l))
    for (let i = 0; i < 20 && !mailFailures().length; i++) await new Promise(r => setTimeout(r, 100))
    const failures = mailFailures()
    expect(failures[0]).toMatchObject({ level: 'warn', outboxId: failed.id, attempts: 1 })
    expect(failures[0].err).toMatch(/ECONNREFUSED|connect/i)

    // The SMTP server comes up on the port the app was told to use.
    smtp = await startFakeSmtp({ smtpPort: stack.smtpPort, httpPort: 0, quiet: true })
    const mailUrl = `http://127.0.0.1:${smtp.httpPort}`
    const mail = await waitForMail(mailUrl, HANDLER_A, 'Reset', 20_000)
    expect(linkIn(mail.text, '/reset-password?token=').startsWith(`${stack.baseUrl}/reset-password?token=`)).toBe(true)

    const sent = await pollRow(HANDLER_A, r => r.status === 'sent', 5_000)
    expect(sent.id).toBe(failed.id)
    expect(sent.attempts).toBeGreaterThanOrEqual(2)
    expect(sent.last_error).toBeNull()
    expect(sent.sent_at).not.toBeNull()

    // Give the worker (every 250 ms in tests) several more rounds: still exactly one message.
    await new Promise(r => setTimeout(r, 1_500))
    expect(await inbox(mailUrl)).toHaveLength(1)
    expect(await rowsFor(HANDLER_A)).toHaveLength(1)
  })
})
