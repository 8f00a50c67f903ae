// Forescent local fake SMTP service, for development and tests only.
//
// A real SMTP server (npm smtp-server) that accepts every message, parses it with mailparser and keeps it in
// memory, plus a small HTTP server to read the messages back (JSON API and a plain HTML inbox).
// Nothing is relayed anywhere. Never expose it beyond localhost.
//
// Run: node fake-services/smtp/server.mjs   (env FAKE_SMTP_PORT, FAKE_SMTP_HTTP_PORT, FAKE_SMTP_HOST)
// Use in tests: const fake = await startFakeSmtp({ smtpPort: 0, httpPort: 0, quiet: true })

import { randomUUID } from 'node:crypto'
import http from 'node:http'
import { pathToFileURL } from 'node:url'
import { simpleParser } from 'mailparser'
import { SMTPServer } from 'smtp-server'

/** Messages kept in memory; the oldest is dropped beyond this. */
export const MAX_MESSAGES = 2000
/** Largest message accepted, in bytes. A generous limit for a dev inbox (our own choice). */
const MAX_MESSAGE_BYTES = 25 * 1024 * 1024

/**
 * @typedef {object} StoredMessage
 * @property {string} id
 * @property {string} receivedAt ISO 8601 time the message was received
 * @property {string} from sender address (From header, else the SMTP envelope sender)
 * @property {string[]} to recipient addresses as delivered (SMTP envelope, includes cc and bcc), lower-cased
 * @property {string} subject
 * @property {string} text plain-text body ('' when the message had none)
 * @property {string | null} html HTML body, or null when the message had none
 * @property {string | null} messageId Message-ID header
 * @property {{ filename: string | null, contentType: string, size: number }[]} attachments files attached, in order
 *   (their bytes at GET /api/messages/:id/attachments/:index)
 */

/** @param {unknown} value */
function escapeHtml(value) {
  return String(value ?? '')
    .replaceAll('&', '&amp;')
    .replaceAll('<', '&lt;')
    .replaceAll('>', '&gt;')
    .replaceAll('"', '&quot;')
    .replaceAll("'", '&#39;')
}

/** @param {import('mailparser').AddressObject | import('mailparser').AddressObject[] | undefined} field */
function addressesOf(field) {
  const list = Array.isArray(field) ? field : field ? [field] : []
  /** @type {string[]} */
  const out = []
  /** @param {any[]} values */
  const walk = (values) => {
    for (const v of values ?? []) {
      if (v.address) out.push(String(v.address))
      if (Array.isArray(v.group)) walk(v.group)
    }
  }
  for (const obj of list) walk(obj.value)
  return out
}

/** @param {string} iso */
function displayTime(iso) {
  return iso.replace('T', ' ').replace(/\.\d+Z$/, ' UTC')
}

const PAGE_CSS = `
  *{box-sizing:border-box}
  body{margin:0;font:15px/1.5 system-ui,-apple-system,"Segoe UI",Roboto,sans-serif;color:#1f2933;background:#f5f7f8}
  header{background:#1f3b4d;color:#fff;padding:12px 20px;display:flex;gap:16px;align-items:center;flex-wrap:wrap}
  header h1{font-size:18px;margin:0;font-weight:600}
  header a{color:#fff}
  header form{margin:0 0 0 auto}
  main{max-width:1000px;margin:0 auto;padding:20px}
  table{width:100%;border-collapse:collapse;background:#fff;border:1px solid #d9e0e4}
  th,td{text-align:left;padding:8px 12px;border-bottom:1px solid #e4e9ec;vertical-align:top}
  th{background:#eef2f4;font-weight:600;font-size:13px}
  td.time{white-space:nowrap;color:#52606d;font-size:13px}
  a{color:#1d5f8a}
  .muted{color:#52606d}
  dl{display:grid;grid-template-columns:max-content 1fr;gap:4px 16px;background:#fff;border:1px solid #d9e0e4;padding:12px 16px;margin:0 0 16px}
  dt{font-weight:600}
  dd{margin:0;word-break:break-word}
  h2{font-size:16px;margin:20px 0 8px}
  pre{white-space:pre-wrap;word-break:break-word;background:#fff;border:1px solid #d9e0e4;padding:12px 16px;margin:0;font:13px/1.5 ui-monospace,Menlo,Consolas,monospace}
  iframe{width:100%;height:480px;border:1px solid #d9e0e4;background:#fff}
  button{font:inherit;padding:4px 12px;border:1px solid #fff;background:transparent;color:#fff;border-radius:4px;cursor:pointer}
`

/**
 * @param {string} title
 * @param {string} body already-escaped HTML
 */
function page(title, body) {
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width,initial-scale=1">
<title>${escapeHtml(title)}</title><style>${PAGE_CSS}</style></head>
<body><header><h1>Forescent fake SMTP inbox</h1><a href="/">Inbox</a>
<form method="post" action="/clear"><button type="submit">Delete all messages</button></form></header>
<main>${body}</main></body></html>`
}

/** @param {StoredMessage[]} messages newest first */
function inboxPage(messages) {
  if (messages.length === 0) {
    return page('Inbox (0)', '<p class="muted">No messages yet. Reload this page after the app sends one.</p>')
  }
  const rows = messages
    .map(
      (m) => `<tr><td class="time">${escapeHtml(displayTime(m.receivedAt))}</td>
<td>${escapeHtml(m.to.join(', '))}</td>
<td><a href="/messages/${encodeURIComponent(m.id)}">${escapeHtml(m.subject || '(no subject)')}</a></td></tr>`,
    )
    .join('\n')
  return page(
    `Inbox (${messages.length})`,
    `<p class="muted">${messages.length} message${messages.length === 1 ? '' : 's'}, newest first.</p>
<table><thead><tr><th>Received</th><th>To</th><th>Subject</th></tr></thead><tbody>
${rows}
</tbody></table>`,
  )
}

/** @param {StoredMessage} m */
function messagePage(m) {
  // The HTML body is shown in a sandbox without scripts; links open in a new tab.
  const srcdoc = m.html ? `<base target="_blank">${m.html}` : ''
  return page(
    m.subject || '(no subject)',
    `<dl>
<dt>Subject</dt><dd>${escapeHtml(m.subject || '(no subject)')}</dd>
<dt>From</dt><dd>${escapeHtml(m.from)}</dd>
<dt>To</dt><dd>${escapeHtml(m.to.join(', '))}</dd>
<dt>Received</dt><dd>${escapeHtml(displayTime(m.receivedAt))}</dd>
<dt>Id</dt><dd><a href="/api/messages/${encodeURIComponent(m.id)}">${escapeHtml(m.id)}</a> (JSON)</dd>
</dl>
${m.attachments.length ? `<h2>Attachments</h2><ul>${m.attachments.map((a, i) => `<li><a href="/api/messages/${encodeURIComponent(m.id)}/attachments/${i}">${escapeHtml(a.filename || `attachment ${i + 1}`)}</a> <span class="muted">${escapeHtml(a.contentType)}, ${a.size} bytes</span></li>`).join('')}</ul>` : ''}
<h2>Text body</h2>
${m.text ? `<pre>${escapeHtml(m.text)}</pre>` : '<p class="muted">No text body.</p>'}
<h2>HTML body</h2>
${
  m.html
    ? `<iframe title="HTML body" sandbox="allow-popups allow-popups-to-escape-sandbox" srcdoc="${escapeHtml(srcdoc)}"></iframe>`
    : '<p class="muted">No HTML body.</p>'
}`,
  )
}

/**
 * @param {http.ServerResponse} res
 * @param {number} status
 * @param {unknown} body
 */
function sendJson(res, status, body) {
  const data = JSON.stringify(body)
  res.writeHead(status, {
    'content-type': 'application/json; charset=utf-8',
    'content-length': Buffer.byteLength(data),
    'cache-control': 'no-store',
  })
  res.end(data)
}

/**
 * @param {http.ServerResponse} res
 * @param {number} status
 * @param {string} html
 */
function sendHtml(res, status, html) {
  res.writeHead(status, {
    'content-type': 'text/html; charset=utf-8',
    'content-length': Buffer.byteLength(html),
    'cache-control': 'no-store',
    // No external resources; inline styles only. Applies to the srcdoc iframe too.
    'content-security-policy': "default-src 'none'; style-src 'unsafe-inline'; img-src data:; frame-src 'self'; form-action 'self'",
    'x-content-type-options': 'nosniff',
  })
  res.end(html)
}

/** @param {import('node:net').Server} server */
function boundPort(server) {
  const addr = server.address()
  return addr && typeof addr === 'object' ? addr.port : 0
}

/**
 * @param {import('node:net').Server | http.Server} server
 * @param {number} port
 * @param {string} host
 * @returns {Promise<void>}
 */
function listen(server, port, host) {
  return new Promise((resolve, reject) => {
    const onError = (/** @type {Error} */ err) => reject(err)
    server.once('error', onError)
    server.listen(port, host, () => {
      server.off('error', onError)
      resolve()
    })
  })
}

/**
 * Starts the fake SMTP server and its HTTP API. Port 0 picks a free port; the real ports are returned.
 *
 * @param {{ smtpPort?: number, httpPort?: number, host?: string, quiet?: boolean }} [options]
 * @returns {Promise<{ smtpPort: number, httpPort: number, close: () => Promise<void> }>}
 */
export async function startFakeSmtp({ smtpPort = 2525, httpPort = 8025, host = '127.0.0.1', quiet = false } = {}) {
  /** @type {StoredMessage[]} oldest first */
  const messages = []
  /** @type {Map<string, Buffer[]>} attachment bytes by message id */
  const attachmentBytes = new Map()
  const log = quiet ? () => {} : (/** @type {string} */ line) => console.log(`[fake-smtp] ${line}`)

  const smtp = new SMTPServer({
    logger: false,
    secure: false,
    authOptional: true,
    disabledCommands: ['STARTTLS'],
    size: MAX_MESSAGE_BYTES,
    rejectOversized: true,
    closeTimeout: 1000,
    onAuth(_auth, _session, callback) {
      callback(null, { user: 'fake' }) // any credentials are accepted
    },
    onData(stream, session, callback) {
      simpleParser(stream)
        .then((parsed) => {
          if (stream.sizeExceeded) return callback(null) // rejectOversized answers 552
          const envelopeTo = (session.envelope.rcptTo || []).map((r) => r.address.toLowerCase())
          const headerTo = addressesOf(parsed.to).map((a) => a.toLowerCase())
          const mailFrom = session.envelope.mailFrom ? session.envelope.mailFrom.address : ''
          /** @type {StoredMessage} */
          const message = {
            id: randomUUID(),
            receivedAt: new Date().toISOString(),
            from: addressesOf(parsed.from)[0] || mailFrom || '',
            to: envelopeTo.length > 0 ? [...new Set(envelopeTo)] : headerTo,
            subject: parsed.subject || '',
            text: parsed.text || '',
            html: typeof parsed.html === 'string' && parsed.html ? parsed.html : null,
            messageId: parsed.messageId || null,
            attachments: (parsed.attachments || []).map((a) => ({ filename: a.filename || null, contentType: a.contentType, size: a.size })),
          }
          attachmentBytes.set(message.id, (parsed.attachments || []).map((a) => a.content))
          messages.push(message)
          while (messages.length > MAX_MESSAGES) attachmentBytes.delete(/** @type {StoredMessage} */ (messages.shift()).id)
          log(`received "${message.subject}" for ${message.to.join(', ')}`)
          callback(null, `Message queued as ${message.id}`)
        })
        .catch((/** @type {Error} */ err) => {
          log(`could not parse a message: ${err.message}`)
          const error = /** @type {Error & { responseCode?: number }} */ (new Error('Could not parse the message'))
          error.responseCode = 554
          callback(error)
        })
    },
  })
  smtp.on('error', (err) => log(`SMTP error: ${err.message}`))

  /** @param {URLSearchParams} query */
  const listMessages = (query) => {
    const to = (query.get('to') || '').trim().toLowerCase()
    const subject = (query.get('subject') || '').toLowerCase()
    return messages
      .filter((m) => !to || m.to.includes(to))
      .filter((m) => !subject || m.subject.toLowerCase().includes(subject))
      .reverse()
  }
  /** @param {string} id */
  const findMessage = (id) => messages.find((m) => m.id === id)

  const httpServer = http.createServer((req, res) => {
    const url = new URL(req.url || '/', 'http://localhost')
    const path = url.pathname.replace(/\/+$/, '') || '/'
    const method = req.method || 'GET'
    const isRead = method === 'GET' || method === 'HEAD'

    try {
      if (path === '/health' && isRead) return sendJson(res, 200, { ok: true })

      if (path === '/api/messages') {
        if (isRead) return sendJson(res, 200, listMessages(url.searchParams))
        if (method === 'DELETE') {
          messages.length = 0
          attachmentBytes.clear()
          res.writeHead(204)
          return res.end()
        }
        return sendJson(res, 405, { error: `${method} is not supported on /api/messages; use GET or DELETE.` })
      }

      const fileMatch = /^\/api\/messages\/([^/]+)\/attachments\/(\d+)$/.exec(path)
      if (fileMatch) {
        if (!isRead) return sendJson(res, 405, { error: `${method} is not supported here; use GET.` })
        const found = findMessage(decodeURIComponent(fileMatch[1]))
        const bytes = found ? attachmentBytes.get(found.id)?.[Number(fileMatch[2])] : undefined
        if (!found || !bytes) return sendJson(res, 404, { error: 'No attachment with this index on this message.' })
        const meta = found.attachments[Number(fileMatch[2])]
        res.writeHead(200, { 'content-type': meta?.contentType || 'application/octet-stream', 'content-length': bytes.length, 'cache-control': 'no-store' })
        return res.end(bytes)
      }

      const apiMatch = /^\/api\/messages\/([^/]+)$/.exec(path)
      if (apiMatch) {
        if (!isRead) return sendJson(res, 405, { error: `${method} is not supported here; use GET.` })
        const found = findMessage(decodeURIComponent(apiMatch[1]))
        return found ? sendJson(res, 200, found) : sendJson(res, 404, { error: 'No message with this id.' })
      }

      if (path === '/' && isRead) return sendHtml(res, 200, inboxPage(listMessages(url.searchParams)))

      if (path === '/clear' && method === 'POST') {
        messages.length = 0
        attachmentBytes.clear()
        res.writeHead(303, { location: '/' })
        return res.end()
      }

      const pageMatch = /^\/messages\/([^/]+)$/.exec(path)
      if (pageMatch && isRead) {
        const found = findMessage(decodeURIComponent(pageMatch[1]))
        return found
          ? sendHtml(res, 200, messagePage(found))
          : sendHtml(res, 404, page('Not found', '<p>No message with this id. It may have been deleted.</p>'))
      }

      return sendJson(res, 404, { error: `Nothing at ${method} ${path}.` })
    } catch (err) {
      // Malformed percent-encoding in the path is the only expected cause.
      return sendJson(res, 400, { error: `Bad request: ${err instanceof Error ? err.message : String(err)}` })
    }
  })

  await listen(smtp.server, smtpPort, host)
  try {
    await listen(httpServer, httpPort, host)
  } catch (err) {
    await new Promise((resolve) => smtp.close(() => resolve(undefined)))
    throw err
  }

  let closing = /** @type {Promise<void> | null} */ (null)
  const close = () => {
    closing ??= Promise.all([
      new Promise((resolve) => smtp.close(() => resolve(undefined))),
      new Promise((resolve) => {
        httpServer.close(() => resolve(undefined))
        httpServer.closeAllConnections()
      }),
    ]).then(() => undefined)
    return closing
  }

  return { smtpPort: boundPort(smtp.server), httpPort: boundPort(httpServer), close }
}

/** @param {string | undefined} value @param {number} fallback @param {string} name */
function portFromEnv(value, fallback, name) {
  if (value === undefined || value === '') return fallback
  const port = Number(value)
  if (!Number.isInteger(port) || port < 0 || port > 65535) {
    throw new Error(`${name} must be a port number from 0 to 65535, got "${value}".`)
  }
  return port
}

const isMain = process.argv[1] !== undefined && import.meta.url === pathToFileURL(process.argv[1]).href

if (isMain) {
  try {
    const host = process.env.FAKE_SMTP_HOST || '127.0.0.1'
    const fake = await startFakeSmtp({
      smtpPort: portFromEnv(process.env.FAKE_SMTP_PORT, 2525, 'FAKE_SMTP_PORT'),
      httpPort: portFromEnv(process.env.FAKE_SMTP_HTTP_PORT, 8025, 'FAKE_SMTP_HTTP_PORT'),
      host,
    })
    console.log(`[fake-smtp] SMTP on ${host}:${fake.smtpPort}, inbox and API on http://${host}:${fake.httpPort}/`)
    const shutdown = (/** @type {string} */ signal) => {
      console.log(`[fake-smtp] ${signal}, closing`)
      fake.close().then(
        () => process.exit(0),
        () => process.exit(1),
      )
    }
    process.once('SIGINT', () => shutdown('SIGINT'))
    process.once('SIGTERM', () => shutdown('SIGTERM'))
  } catch (err) {
    console.error(`[fake-smtp] could not start: ${err instanceof Error ? err.message : String(err)}`)
    process.exit(1)
  }
}
