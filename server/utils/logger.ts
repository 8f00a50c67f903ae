// Structured logs: one JSON line per event on stdout (pino), each with the request id of the request it belongs to,
// who (user id and role), what (an event name such as "auth.sign-in.failed") and when (ISO time). Shared by the
// security log (sign-ins, failures, throttling, refusals, privileged actions, mail failures) and the operations log
// (one line per request, errors, jobs). Never log bodies, cookies, headers or tokens: the redaction below is a second
// line of defence, not the first (OWASP Logging Cheat Sheet, "Data to exclude").
import pino, { type Logger } from 'pino'
import type { H3Event } from 'h3'
import { useEvent } from 'nitropack/runtime'

const REDACTED_KEYS = ['password', 'currentPassword', 'newPassword', 'token', 'code', 'recoveryCode', 'secret', 'cookie', 'authorization', 'set-cookie']
const REDACT_PATHS = [...REDACTED_KEYS, ...REDACTED_KEYS.map(k => `*.${k}`), 'headers', '*.headers', 'body', '*.body']

let root: Logger | undefined

/** The process's logger (LOG_LEVEL sets the level, default info). */
export function useLogger(): Logger {
  root ??= pino({
    level: process.env.LOG_LEVEL || 'info',
    base: { service: 'forescent' },
    timestamp: pino.stdTimeFunctions.isoTime,
    formatters: { level: label => ({ level: label }) },
    redact: { paths: REDACT_PATHS, censor: '[redacted]' },
  })
  return root
}

/**
 * A path fit for a log line: no query string (it can hold a reset token) and the token segment of invitation links
 * replaced, so a log never holds a usable link.
 */
export function loggablePath(path: string): string {
  return path.split('?')[0]!.replace(/\/(invitations?)\/[^/]+/, (_m, seg: string) => `/${seg}/[token]`).slice(0, 300)
}

function currentEvent(): H3Event | undefined {
  try { return useEvent() }
  catch { return undefined }
}

/** The fields that tie a line to its request: request id, method, path, the signed-in user and their address. */
export function requestFields(event: H3Event | undefined = currentEvent()): Record<string, unknown> {
  if (!event) return {}
  const user = event.context.authUser as { id: string, role: string } | undefined
  return {
    reqId: event.context.requestId,
    method: event.method,
    path: loggablePath(event.path),
    ...(user ? { userId: user.id, role: user.role } : {}),
    ip: event.context.clientAddress,
  }
}

export type LogLevel = 'info' | 'warn' | 'error'

/** Logs one named event with the current request's fields (when there is a request) and the given details. */
export function logEvent(name: string, details: Record<string, unknown> = {}, level: LogLevel = 'info', event?: H3Event) {
  useLogger()[level]({ event: name, ...requestFields(event), ...details })
}

/** The text of an error for a log line (its message, never a whole object that might carry a request). */
export function errorText(err: unknown): string {
  return String((err as Error)?.message ?? err).slice(0, 500)
}

/** A failure of some work, as one JSON line: `what` names it ("homework-uploads.store"), `message` says it for people. */
export function logFailure(what: string, message: string, err?: unknown, level: LogLevel = 'error') {
  logEvent(what, { msg: message, ...(err !== undefined ? { err: errorText(err) } : {}) }, level)
}
