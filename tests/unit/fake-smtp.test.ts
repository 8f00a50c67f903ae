import { createTransport } from 'nodemailer'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { startFakeSmtp } from '../../fake-services/smtp/server.mjs'

// Invented people and addresses. The .test top-level domain is reserved for testing (RFC 2606).
const TRAINER = 'marta.okonkwo@fernhill-scentwork.test'
const HANDLER_A = 'Ilse.Brandvold@household-a.test'
const HANDLER_B = 'tomasz.reyes@household-b.test'

type Message = {
  id: string
  receivedAt: string
  from: string
  to: string[]
  subject: string
  text: string
  html: string | null
}

let fake: Awaited<ReturnType<typeof startFakeSmtp>>
let base: string

async function getJson<T>(path: string): Promise<{ status: number; body: T }> {
  const res = await fetch(`${base}${path}`)
  return { status: res.status, body: (await res.json()) as T }
}

async function send(mail: { to: string; subject: string; text: string; html?: string; attachments?: { filename: string; content: Buffer; contentType: string }[] }) {
  const transport = createTransport({ host: '127.0.0.1', port: fake.smtpPort, secure: false, ignoreTLS: true })
  try {
    return await transport.sendMail({ from: `Fernhill Scentwork <${TRAINER}>`, ...mail })
  } finally {
    transport.close()
  }
}

beforeAll(async () => {
  fake = await startFakeSmtp({ smtpPort: 0, httpPort: 0, quiet: true })
  base = `http://127.0.0.1:${fake.httpPort}`
})

afterAll(async () => {
  await fake?.close()
})

describe('fake SMTP service', () => {
  it('binds real ports when asked for port 0 and reports health', async () => {
    expect(fake.smtpPort).toBeGreaterThan(0)
    expect(fake.httpPort).toBeGreaterThan(0)
    expect(fake.smtpPort).not.toBe(fake.httpPort)
    const health = await getJson<{ ok: boolean }>('/health')
    expect(health).toEqual({ status: 200, body: { ok: true } })
  })

  it('receives real messages and serves them through the API', async () => {
    const first = await send({
      to: HANDLER_A,
      subject: 'Homework reviewed: discrimination session 4',
      text: 'Your session video was reviewed. Two hits, one false alert.',
      html: '<p>Your session video was <strong>reviewed</strong>.</p>',
    })
    const second = await send({
      to: HANDLER_B,
      subject: 'Invoice 2025-0042 is due',
      text: 'Your programme fee invoice is due in 7 days.',
    })
    expect(first.accepted).toEqual([HANDLER_A])
    expect(second.accepted).toEqual([HANDLER_B])

    const all = await getJson<Message[]>('/api/messages')
    expect(all.status).toBe(200)
    expect(all.body).toHaveLength(2)
    // Newest first.
    const b = all.body[0]!
    const a = all.body[1]!
    expect(b.to).toEqual([HANDLER_B])
    expect(b.subject).toBe('Invoice 2025-0042 is due')
    expect(b.text.trim()).toBe('Your programme fee invoice is due in 7 days.')
    expect(b.html).toBeNull()
    expect(a.to).toEqual([HANDLER_A.toLowerCase()])
    expect(a.from).toBe(TRAINER)
    expect(a.subject).toBe('Homework reviewed: discrimination session 4')
    expect(a.text.trim()).toBe('Your session video was reviewed. Two hits, one false alert.')
    expect(a.html).toContain('<strong>reviewed</strong>')
    expect(Number.isNaN(Date.parse(a.receivedAt))).toBe(false)
    expect(a.id).not.toBe(b.id)

    // ?to= filters by recipient, case-insensitively.
    const forA = await getJson<Message[]>(`/api/messages?to=${encodeURIComponent(HANDLER_A.toUpperCase())}`)
    expect(forA.body.map((m) => m.id)).toEqual([a.id])
    const forNobody = await getJson<Message[]>('/api/messages?to=nobody%40household-c.test')
    expect(forNobody.body).toEqual([])

    // ?subject= filters by substring.
    const invoices = await getJson<Message[]>('/api/messages?subject=invoice')
    expect(invoices.body.map((m) => m.id)).toEqual([b.id])

    // One message by id, and a 404 JSON for an unknown id.
    const one = await getJson<Message>(`/api/messages/${a.id}`)
    expect(one.status).toBe(200)
    expect(one.body).toEqual(a)
    const missing = await getJson<{ error: string }>('/api/messages/00000000-0000-4000-8000-000000000000')
    expect(missing.status).toBe(404)
    expect(missing.body.error).toMatch(/no message/i)

    // The HTML message page shows the text body.
    const pageRes = await fetch(`${base}/messages/${a.id}`)
    expect(pageRes.status).toBe(200)
    const pageHtml = await pageRes.text()
    expect(pageHtml).toContain('Two hits, one false alert.')
    expect(pageHtml).toContain('sandbox=')
  })

  it('escapes a hostile subject in the HTML inbox', async () => {
    const hostile = '<script>alert("x")</script> Sample bank low'
    await send({ to: HANDLER_A, subject: hostile, text: 'Top up the control samples.' })

    const res = await fetch(`${base}/`)
    expect(res.status).toBe(200)
    expect(res.headers.get('content-type')).toMatch(/text\/html/)
    const html = await res.text()
    expect(html).not.toContain('<script>')
    expect(html).toContain('&lt;script&gt;alert(&quot;x&quot;)&lt;/script&gt; Sample bank low')
    expect(html).toContain(HANDLER_A.toLowerCase())

    const newest = (await getJson<Message[]>("/api/messages")).body[0]!
    const detail = await (await fetch(`${base}/messages/${newest.id}`)).text()
    expect(detail).not.toContain('<script>')
  })

  it('DELETE clears every message', async () => {
    const before = await getJson<Message[]>('/api/messages')
    expect(before.body.length).toBeGreaterThan(0)

    const res = await fetch(`${base}/api/messages`, { method: 'DELETE' })
    expect(res.status).toBe(204)

    const after = await getJson<Message[]>('/api/messages')
    expect(after.body).toEqual([])
    const gone = await getJson<{ error: string }>(`/api/messages/${before.body[0]!.id}`)
    expect(gone.status).toBe(404)
  })

  it('keeps attachments: listed in the message JSON, bytes downloadable by index', async () => {
    const bytes = Buffer.from('%PDF-1.7 invented test bytes')
    await send({ to: HANDLER_B, subject: 'With a file', text: 'See attached.', attachments: [{ filename: 'INV-2026-0001.pdf', content: bytes, contentType: 'application/pdf' }] })
    const list = await getJson<Array<Message & { attachments: { filename: string; contentType: string; size: number }[] }>>(`/api/messages?subject=${encodeURIComponent('With a file')}`)
    const m = list.body[0]!
    expect(m.attachments).toEqual([{ filename: 'INV-2026-0001.pdf', contentType: 'application/pdf', size: bytes.length }])
    const file = await fetch(`${base}/api/messages/${m.id}/attachments/0`)
    expect(file.headers.get('content-type')).toBe('application/pdf')
    expect(Buffer.from(await file.arrayBuffer()).equals(bytes)).toBe(true)
    expect((await fetch(`${base}/api/messages/${m.id}/attachments/1`)).status).toBe(404)
  })
})
