// A tiny HTTP client for tests that keeps a session cookie, like one browser.
import { DEMO_PASSWORD } from '../../scripts/lib/seed-data'

export interface ApiResponse<T = any> { status: number, body: T, headers: Headers }

export class Agent {
  cookie = ''
  constructor(readonly baseUrl: string) {}

  async request<T = any>(method: string, path: string, body?: unknown, headers: Record<string, string> = {}): Promise<ApiResponse<T>> {
    const init: RequestInit = { method, headers: { ...headers }, redirect: 'manual' }
    if (this.cookie) (init.headers as Record<string, string>).cookie = this.cookie
    if (body !== undefined) {
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
  return m[0]
}
