import nodemailer, { type Transporter } from 'nodemailer'

let transport: Transporter | undefined

/** SMTP settings: SMTP_* env vars (README "Configuration"), else runtime config (NUXT_SMTP_*), else the local fake. */
export function smtpSettings() {
  const rc = useRuntimeConfig()
  return {
    host: process.env.SMTP_HOST || rc.smtpHost || '127.0.0.1',
    port: Number(process.env.SMTP_PORT || rc.smtpPort || 2525),
    secure: (process.env.SMTP_SECURE ?? String(rc.smtpSecure)) === 'true',
    user: process.env.SMTP_USER || rc.smtpUser || '',
    pass: process.env.SMTP_PASS || rc.smtpPass || '',
    from: process.env.MAIL_FROM || rc.mailFrom || 'Forescent <no-reply@forescent.test>',
  }
}

export function useMailer(): Transporter {
  if (!transport) {
    const s = smtpSettings()
    transport = nodemailer.createTransport({
      host: s.host,
      port: s.port,
      secure: s.secure,
      auth: s.user ? { user: s.user, pass: s.pass } : undefined,
      connectionTimeout: 5000,
      greetingTimeout: 5000,
      socketTimeout: 10000,
    })
  }
  return transport
}

const escapeHtml = (s: string) => s.replace(/[&<>"']/g, c => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', '\'': '&#39;' })[c]!)

export interface EmailContent { subject: string, text: string, html: string }

/** Our e-mail layout: a greeting, paragraphs, an optional button link, and a footer. */
export function composeEmail(opts: { subject: string, greeting: string, paragraphs: string[], action?: { label: string, url: string }, footer?: string }): EmailContent {
  const footer = opts.footer ?? 'Forescent — scent-detection training records for your programme.'
  const text = [
    opts.greeting, '',
    ...opts.paragraphs.flatMap(p => [p, '']),
    ...(opts.action ? [`${opts.action.label}: ${opts.action.url}`, ''] : []),
    '—', footer,
  ].join('\n')
  const html = `<!doctype html><html><body style="margin:0;background:#fbf9f5;font-family:system-ui,sans-serif;color:#1d2422">
<div style="max-width:560px;margin:0 auto;padding:24px">
<p style="font-weight:600;color:#1f4d45;font-size:18px;margin:0 0 16px">Forescent</p>
<p>${escapeHtml(opts.greeting)}</p>
${opts.paragraphs.map(p => `<p style="line-height:1.5">${escapeHtml(p)}</p>`).join('\n')}
${opts.action ? `<p style="margin:24px 0"><a href="${escapeHtml(opts.action.url)}" style="background:#1f4d45;color:#fff;padding:12px 18px;border-radius:8px;text-decoration:none;font-weight:600">${escapeHtml(opts.action.label)}</a></p><p style="font-size:13px;color:#4a5653">Or copy this link: ${escapeHtml(opts.action.url)}</p>` : ''}
<hr style="border:none;border-top:1px solid #ebe2d0;margin:24px 0"><p style="font-size:12px;color:#7b8784">${escapeHtml(footer)}</p>
</div></body></html>`
  return { subject: opts.subject, text, html }
}
