// Forescent local fake Stripe, for development and tests only. Never expose it beyond localhost.
//
// Answers the small part of Stripe's HTTP API the app uses, with the same paths, form-encoded requests, JSON shapes
// and error format the stripe SDK expects (from memory of Stripe's public API reference):
//   POST /v1/checkout/sessions        create (Idempotency-Key honoured: the same key returns the same session)
//   GET  /v1/checkout/sessions/:id    retrieve
//   POST /v1/checkout/sessions/:id/expire  expire an open session (its page then refuses to take a card)
// It serves our own simple hosted payment page at /pay/:id with a test card form, and delivers webhook events to the
// app signed the way Stripe signs them: header `Stripe-Signature: t=<unix seconds>,v1=<hex HMAC-SHA256 of "t.body">`.
// Test cards (our own choice of numbers, following Stripe's documented test-card idea):
//   4242 4242 4242 4242  succeeds      4000 0000 0000 0002  declined      4000 0000 0000 3220  asks for a second step
// Helper endpoints for tests: GET /_fake/events, POST /_fake/events/:id/resend[?age=seconds] (a negative age signs it
// in the future), POST /_fake/down (toggle 503s), POST /_fake/sessions/:id/complete with JSON { currency, amount_total, metadata }
// (pays a session as if the provider had charged another currency or amount: a signed event the app must not trust blindly).
//
// Run: node fake-services/stripe/server.mjs  (env FAKE_STRIPE_PORT, FAKE_STRIPE_WEBHOOK_URL, STRIPE_WEBHOOK_SECRET)

import { createHmac, randomBytes } from 'node:crypto'
import http from 'node:http'
import { pathToFileURL } from 'node:url'

export const CARDS = { ok: '4242424242424242', declined: '4000000000000002', secondStep: '4000000000003220' }

const rid = prefix => `${prefix}_test_${randomBytes(12).toString('hex')}`

/** a[b][0][c]=1 form fields into nested objects and arrays, as Stripe's API reads them. */
export function parseForm(body) {
  const out = {}
  for (const [key, value] of new URLSearchParams(body)) {
    const path = key.replace(/\]/g, '').split('[')
    let node = out
    path.forEach((part, i) => {
      const last = i === path.length - 1
      const nextIsIndex = /^\d+$/.test(path[i + 1] ?? '')
      if (last) node[part] = value
      else node = (node[part] ??= nextIsIndex ? [] : {})
    })
  }
  return out
}

/** The Stripe-Signature header for a payload. */
export function signPayload(payload, secret, timestamp = Math.floor(Date.now() / 1000)) {
  const v1 = createHmac('sha256', secret).update(`${timestamp}.${payload}`).digest('hex')
  return `t=${timestamp},v1=${v1}`
}

const escapeHtml = v => String(v ?? '').replace(/[&<>"']/g, c => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c])

function stripeError(res, status, message, param, type = 'invalid_request_error') {
  res.writeHead(status, { 'content-type': 'application/json', 'request-id': rid('req') })
  res.end(JSON.stringify({ error: { type, message, ...(param ? { param } : {}) } }))
}
function json(res, status, body) {
  res.writeHead(status, { 'content-type': 'application/json', 'request-id': rid('req') })
  res.end(JSON.stringify(body))
}
function readBody(req) {
  return new Promise((resolve, reject) => {
    let data = ''
    req.on('data', (c) => { data += c; if (data.length > 1e6) req.destroy() })
    req.on('end', () => resolve(data))
    req.on('error', reject)
  })
}

function page(title, body) {
  return `<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1"><title>${escapeHtml(title)}</title>
<style>body{font-family:system-ui,sans-serif;background:#f4f1ea;color:#1d2422;margin:0}main{max-width:420px;margin:40px auto;background:#fff;padding:24px;border-radius:12px}
label{display:block;margin:12px 0 4px;font-weight:600}input{width:100%;padding:10px;font-size:16px;box-sizing:border-box}button{margin-top:16px;width:100%;padding:12px;font-size:16px;background:#1f4d45;color:#fff;border:0;border-radius:8px}
.err{color:#9a3b25}.note{font-size:13px;color:#4a5653}</style></head><body><main>${body}</main></body></html>`
}

/**
 * @param {{ port?: number, host?: string, webhookUrl?: string, webhookSecret?: string, quiet?: boolean }} opts
 */
export async function startFakeStripe(opts = {}) {
  const host = opts.host ?? '127.0.0.1'
  const state = {
    webhookUrl: opts.webhookUrl ?? '',
    webhookSecret: opts.webhookSecret ?? 'whsec_fake',
    down: false,
    sessions: new Map(),
    idempotent: new Map(), // key → { fingerprint, response }
    events: [], // { id, payload, deliveries: [{ status, at }] }
  }
  const log = (...a) => { if (!opts.quiet) console.log('[fake-stripe]', ...a) }
  let baseUrl = ''

  async function deliver(evt, attempt = 1, ageSeconds = 0) {
    if (!state.webhookUrl) return
    let status = 0
    try {
      const res = await fetch(state.webhookUrl, { method: 'POST', headers: { 'content-type': 'application/json', 'stripe-signature': signPayload(evt.payload, state.webhookSecret, Math.floor(Date.now() / 1000) - ageSeconds) }, body: evt.payload })
      status = res.status
    }
    catch { status = 0 }
    evt.deliveries.push({ status, at: new Date().toISOString() })
    log('delivered', evt.id, status)
    // Like Stripe, retry what was not acknowledged with a 2xx (here quickly, up to 5 times).
    if ((status < 200 || status >= 300) && attempt < 5) setTimeout(() => void deliver(evt, attempt + 1), 200 * 2 ** attempt)
  }

  function emit(type, object) {
    const evt = { id: rid('evt'), object: 'event', api_version: '2024-06-20', created: Math.floor(Date.now() / 1000), type, livemode: false, data: { object } }
    const record = { id: evt.id, type, payload: JSON.stringify(evt), deliveries: [] }
    state.events.push(record)
    void deliver(record)
    return record
  }

  function complete(session) {
    session.status = 'complete'
    session.payment_status = 'paid'
    session.payment_intent = rid('pi')
    emit('checkout.session.completed', { ...session })
  }

  async function api(req, res, url) {
    if (state.down) return stripeError(res, 503, 'The fake Stripe service is switched off.', undefined, 'api_error')
    const auth = req.headers.authorization ?? ''
    if (!/^Bearer sk_(test|live)_\w+/.test(auth)) return stripeError(res, 401, 'Invalid API Key provided.', undefined, 'invalid_request_error')
    const ex = url.pathname.match(/^\/v1\/checkout\/sessions\/([\w]+)\/expire$/)
    if (ex && req.method === 'POST') {
      const s = state.sessions.get(ex[1])
      if (!s) return stripeError(res, 404, `No such checkout.session: '${ex[1]}'`, 'id')
      if (s.status !== 'open') return stripeError(res, 400, `Only Checkout Sessions with a status in ["open"] can be expired. This Checkout Session has a status of "${s.status}".`)
      s.status = 'expired'
      emit('checkout.session.expired', { ...s })
      return json(res, 200, s)
    }
    const m = url.pathname.match(/^\/v1\/checkout\/sessions(?:\/([\w]+))?$/)
    if (!m) return stripeError(res, 404, `Unrecognized request URL (${req.method}: ${url.pathname}).`)
    if (req.method === 'GET' && m[1]) {
      const s = state.sessions.get(m[1])
      return s ? json(res, 200, s) : stripeError(res, 404, `No such checkout.session: '${m[1]}'`, 'id')
    }
    if (req.method !== 'POST' || m[1]) return stripeError(res, 405, 'Method not allowed.')
    const raw = await readBody(req)
    const key = req.headers['idempotency-key']
    if (key) {
      const seen = state.idempotent.get(key)
      if (seen) {
        if (seen.fingerprint !== raw) return stripeError(res, 400, 'Keys for idempotent requests can only be used with the same parameters they were first used with.', undefined, 'idempotency_error')
        res.setHeader('idempotent-replayed', 'true')
        return json(res, 200, seen.response)
      }
    }
    const p = parseForm(raw)
    const items = Array.isArray(p.line_items) ? p.line_items : []
    if (p.mode !== 'payment') return stripeError(res, 400, 'Missing required param: mode.', 'mode')
    if (!p.success_url) return stripeError(res, 400, 'Missing required param: success_url.', 'success_url')
    if (!items.length) return stripeError(res, 400, 'Missing required param: line_items.', 'line_items')
    let total = 0
    let currency = ''
    for (const [i, it] of items.entries()) {
      const amount = Number(it.price_data?.unit_amount)
      const qty = Number(it.quantity ?? 1)
      if (!Number.isSafeInteger(amount) || amount < 1) return stripeError(res, 400, 'Invalid integer: unit_amount.', `line_items[${i}][price_data][unit_amount]`)
      if (!Number.isSafeInteger(qty) || qty < 1) return stripeError(res, 400, 'Invalid integer: quantity.', `line_items[${i}][quantity]`)
      currency = String(it.price_data?.currency ?? '').toLowerCase()
      total += amount * qty
    }
    const id = rid('cs')
    const session = {
      id, object: 'checkout.session', mode: 'payment', status: 'open', payment_status: 'unpaid', livemode: false,
      amount_total: total, currency, client_reference_id: p.client_reference_id ?? null, customer_email: p.customer_email ?? null,
      metadata: p.metadata ?? {}, success_url: p.success_url, cancel_url: p.cancel_url ?? null, payment_intent: null,
      created: Math.floor(Date.now() / 1000), expires_at: Math.floor(Date.now() / 1000) + 86_400, url: `${baseUrl}/pay/${id}`,
    }
    state.sessions.set(id, session)
    if (key) state.idempotent.set(key, { fingerprint: raw, response: session })
    return json(res, 200, session)
  }

  function payPage(s, message = '') {
    const amount = new Intl.NumberFormat('en-GB', { style: 'currency', currency: s.currency.toUpperCase() }).format(s.amount_total / 100)
    return page('Test payment', `<p class="note">Local test payment page: no real card is charged.</p>
<h1>Pay ${escapeHtml(amount)}</h1>
${message ? `<p class="err" role="alert">${escapeHtml(message)}</p>` : ''}
<form method="post" action="/pay/${escapeHtml(s.id)}">
<label for="card">Card number</label><input id="card" name="card" inputmode="numeric" autocomplete="off" placeholder="4242 4242 4242 4242">
<label for="code">Confirmation code (second step only)</label><input id="code" name="code" inputmode="numeric" autocomplete="off">
<button type="submit">Pay ${escapeHtml(amount)}</button></form>
${s.cancel_url ? `<p><a href="${escapeHtml(s.cancel_url)}">Cancel and go back</a></p>` : ''}`)
  }

  async function hosted(req, res, url) {
    const id = url.pathname.split('/')[2] ?? ''
    const s = state.sessions.get(id)
    if (!s) { res.writeHead(404, { 'content-type': 'text/html' }); return res.end(page('Not found', '<h1>This payment link is not known.</h1>')) }
    if (s.status === 'expired') { res.writeHead(410, { 'content-type': 'text/html' }); return res.end(page('Expired', '<h1>This payment link has expired.</h1><p>Go back and start the payment again.</p>')) }
    if (s.status === 'complete') { res.writeHead(303, { location: s.success_url.replace('{CHECKOUT_SESSION_ID}', s.id) }); return res.end() }
    if (req.method === 'GET') { res.writeHead(200, { 'content-type': 'text/html' }); return res.end(payPage(s)) }
    const form = new URLSearchParams(await readBody(req))
    const card = (form.get('card') ?? '').replace(/\s+/g, '')
    const send = (msg) => { res.writeHead(402, { 'content-type': 'text/html' }); res.end(payPage(s, msg)) }
    if (card === CARDS.declined) return send('Your card was declined. Try another card.')
    if (card === CARDS.secondStep && form.get('code') !== '123456') return send('Your bank asks for a second step: enter the confirmation code 123456 and pay again.')
    if (card !== CARDS.ok && card !== CARDS.secondStep) return send('Use a test card number: 4242 4242 4242 4242.')
    complete(s)
    res.writeHead(303, { location: s.success_url.replace('{CHECKOUT_SESSION_ID}', s.id) })
    res.end()
  }

  async function helpers(req, res, url) {
    if (req.method === 'GET' && url.pathname === '/_fake/events') return json(res, 200, state.events)
    const m = url.pathname.match(/^\/_fake\/events\/([\w]+)\/resend$/)
    if (req.method === 'POST' && m) {
      const evt = state.events.find(e => e.id === m[1])
      if (!evt) return json(res, 404, { error: 'no such event' })
      // ?age=600 signs the delivery as if sent 600 s ago (a stale event the app must refuse).
      await deliver(evt, 5, Number(url.searchParams.get('age') ?? 0))
      return json(res, 200, { id: evt.id, status: evt.deliveries.at(-1)?.status ?? 0 })
    }
    const done = url.pathname.match(/^\/_fake\/sessions\/([\w]+)\/complete$/)
    if (req.method === 'POST' && done) {
      const s = state.sessions.get(done[1])
      if (!s || s.status !== 'open') return json(res, 404, { error: 'no open session' })
      const overrides = JSON.parse((await readBody(req)) || '{}')
      Object.assign(s, overrides.currency ? { currency: String(overrides.currency) } : {}, Number.isSafeInteger(overrides.amount_total) ? { amount_total: overrides.amount_total } : {}, overrides.metadata ? { metadata: { ...s.metadata, ...overrides.metadata } } : {})
      complete(s)
      return json(res, 200, s)
    }
    if (req.method === 'POST' && url.pathname === '/_fake/down') { state.down = !state.down; return json(res, 200, { down: state.down }) }
    return json(res, 404, { error: 'not found' })
  }

  const server = http.createServer((req, res) => {
    const url = new URL(req.url ?? '/', 'http://localhost')
    const handler = url.pathname.startsWith('/v1/') ? api : url.pathname.startsWith('/pay/') ? hosted : url.pathname.startsWith('/_fake/') ? helpers : null
    if (!handler) { res.writeHead(404); return res.end() }
    handler(req, res, url).catch((err) => { log(err); if (!res.headersSent) stripeError(res, 500, 'Fake Stripe failed.', undefined, 'api_error') })
  })
  await new Promise(r => server.listen(opts.port ?? 0, host, r))
  const port = server.address().port
  baseUrl = `http://${host}:${port}`
  log('listening on', baseUrl)
  return {
    port, url: baseUrl, state,
    setWebhookUrl(u) { state.webhookUrl = u },
    close: () => new Promise(r => { server.closeAllConnections?.(); server.close(() => r()) }),
  }
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  await startFakeStripe({
    port: Number(process.env.FAKE_STRIPE_PORT ?? 12111),
    webhookUrl: process.env.FAKE_STRIPE_WEBHOOK_URL ?? 'http://127.0.0.1:3000/api/webhooks/stripe',
    webhookSecret: process.env.STRIPE_WEBHOOK_SECRET ?? 'whsec_fake',
  })
}
