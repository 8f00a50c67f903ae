// A tiny HTTP client for tests that keeps a session cookie, like one browser.
import { appendFileSync, mkdirSync } from 'node:fs'
import { dirname, resolve } from 'node:path'
import { DEMO_PASSWORD } from '../../scripts/lib/seed-data'

/**
 * Every secret a test hands the server or gets from it (passwords and codes in request bodies, session cookies,
 * tokens in links) is noted here; after the integration suite, tests/integration/global-setup.ts looks for each one
 * in the server's log and fails if it finds any.
 */
export const SECRETS_USED_FILE = resolve(import.meta.dirname, '../.tmp/secrets-used.txt')
const SECRET_FIELD = /^(password|currentPassword|newPassword|token|code|recoveryCode|secret)$/i
export function noteSecret(value: unknown) {
  // Shorter values (a 6-digit one-time code) would turn up by chance in the log's ids and timings.
  if (typeof value !== 'string' || value.length < 8) return
  mkdirSync(dirname(SECRETS_USED_FILE), { recursive: true })
  appendFileSync(SECRETS_USED_FILE, `${value.replace(/\n/g, ' ')}\n`)
}
function noteSecretsIn(body: unknown) {
  if (!body || typeof body !== 'object') return
  for (const [k, v] of Object.entries(body)) {
    if (SECRET_FIELD.test(k)) noteSecret(v)
    else if (v && typeof v === 'object') noteSecretsIn(v)
  }
}

export interface ApiResponse<T = any> { status: number, body: T, headers: Headers }

export class Agent {
  cookie = ''
  constructor(readonly baseUrl: string) {}

  async request<T = any>(method: string, path: string, body?: unknown, headers: Record<string, string> = {}): Promise<ApiResponse<T>> {
    // Like a browser on our own pages: state-changing requests say where they come from (server/middleware/0.origin.ts).
    const init: RequestInit = { method, headers: { origin: this.baseUrl, ...headers }, redirect: 'manual' }
    if (this.cookie) (init.headers as Record<string, string>).cookie = this.cookie
    if (body !== undefined) {
      noteSecretsIn(body)
      const raw = typeof body === 'string' || body instanceof FormData || body instanceof Blob || body instanceof Uint8Array || body instanceof ArrayBuffer
      init.body = raw ? (body as BodyInit) : JSON.stringify(body)
      if (!raw || typeof body === 'string') (init.headers as Record<string, string>)['content-type'] ??= 'application/json'
    }
    const res = await fetch(`${this.baseUrl}${path}`, init)
    const setCookie = res.headers.getSetCookie()
    for (const c of setCookie) {
      const [pair] = c.split(';')
      const [name, value] = pair!.split('=')
      if (name === 'forescent-session') this.cookie = value ? `${name}=${value}` : ''
      if (name === 'forescent-session' && value) noteSecret(value)
    }
    const text = await res.text()
    let parsed: unknown = text
    try { parsed = text ? JSON.parse(text) : null }
    catch { /* not JSON */ }
    return { status: res.status, body: parsed as T, headers: res.headers }
  }

  get<T = any>(path: string) { return this.request<T>('GET', path) }
  post<T = any>(path: string, body?: unknown, headers?: Record<string, string>) { return this.request<T>('POST', path, body ?? {}, headers) }
  patch<T = any>(path: string, body?: unknown) { return this.request<T>('PATCH', path, body ?? {}) }
  delete<T = any>(path: string) { return this.request<T>('DELETE', path) }
}

export async function signIn(baseUrl: string, email: string, password = DEMO_PASSWORD): Promise<Agent> {
  const agent = new Agent(baseUrl)
  const res = await agent.post('/api/auth/login', { email, password })
  if (res.status !== 200) throw new Error(`Sign-in as ${email} failed: ${res.status} ${JSON.stringify(res.body)}`)
  return agent
}

export interface InboxMessage { id: string, to: string[], subject: string, text: string, html: string | null }

/** Waits until a message for `to` (and subject containing `subject`) reaches the fake inbox. */
export async function waitForMail(mailUrl: string, to: string, subject?: string, timeoutMs = 10_000): Promise<InboxMessage> {
  const deadline = Date.now() + timeoutMs
  for (;;) {
    const q = new URLSearchParams({ to, ...(subject ? { subject } : {}) })
    const list = await (await fetch(`${mailUrl}/api/messages?${q}`)).json() as InboxMessage[]
    if (list.length) return list[0]!
    if (Date.now() > deadline) throw new Error(`No e-mail to ${to}${subject ? ` about "${subject}"` : ''} arrived within ${timeoutMs} ms`)
    await new Promise(r => setTimeout(r, 150))
  }
}

export async function inbox(mailUrl: string, to?: string): Promise<InboxMessage[]> {
  return (await fetch(`${mailUrl}/api/messages${to ? `?to=${encodeURIComponent(to)}` : ''}`)).json() as Promise<InboxMessage[]>
}

export function linkIn(text: string, pathPrefix: string): string {
  const m = text.match(new RegExp(`https?://[^\\s]+${pathPrefix.replace(/[/?]/g, c => `\\${c}`)}[^\\s]*`))
  if (!m) throw new Error(`No link with ${pathPrefix} in:\n${text}`)
  // A reset or invitation link's token is a secret the logs must never show (other links only name records).
  const url = new URL(m[0])
  if (url.searchParams.has('token')) noteSecret(url.searchParams.get('token'))
  if (url.pathname.startsWith('/invitation/')) noteSecret(url.pathname.split('/').pop())
  return m[0]
}
