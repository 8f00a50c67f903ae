// Starts what the tests run against: a fresh SQLite file with the demo scenario, the fake SMTP service and the
// built server (.output) as a real HTTP server on a free port.
import { spawn, type ChildProcess } from 'node:child_process'
import { createWriteStream, mkdirSync, existsSync, rmSync } from 'node:fs'
import { createServer } from 'node:net'
import { resolve } from 'node:path'
import { randomBytes } from 'node:crypto'
import { migrateDatabase, openDatabase, prepareDatabase } from '../../server/database/client'
import { seedDemo } from '../../scripts/lib/seed-data'
import { startFakeSmtp, type FakeSmtp } from '../../fake-services/smtp/server.mjs'
import { startFakeStripe } from '../../fake-services/stripe/server.mjs'
import { startFakeS3, type FakeS3 } from '../../fake-services/s3/server.mjs'

export const ROOT = resolve(import.meta.dirname, '../..')
export const TEST_SESSION_PASSWORD = 'test-session-password-which-is-long-enough-1234'

export async function freePort(): Promise<number> {
  return new Promise((ok, fail) => {
    const srv = createServer()
    srv.once('error', fail)
    srv.listen(0, '127.0.0.1', () => {
      const { port } = srv.address() as { port: number }
      srv.close(() => ok(port))
    })
  })
}

export function tempDatabaseUrl(label: string): string {
  const dir = resolve(ROOT, 'tests/.tmp')
  mkdirSync(dir, { recursive: true })
  return `file:${resolve(dir, `${label}-${Date.now()}-${randomBytes(3).toString('hex')}.db`)}`
}

/** The stack's file storage folder (FILES_DIR), beside its database under tests/.tmp, so tests can look inside. */
export function filesDirFor(databaseUrl: string): string {
  return `${databaseUrl.replace(/^file:/, '').replace(/\.db$/, '')}-files`
}

/** The stack's folder for resumable uploads in progress (UPLOAD_STAGING_DIR), beside its database. */
export function stagingDirFor(databaseUrl: string): string {
  return `${databaseUrl.replace(/^file:/, '').replace(/\.db$/, '')}-staging`
}

/** Migrates and (re)seeds the database with the demo scenario. */
export async function resetDatabase(url: string) {
  // The stored files belong to the rows being wiped: clear them too, so a reseed is a clean slate.
  rmSync(filesDirFor(url), { recursive: true, force: true })
  const { client, db } = openDatabase(url)
  await prepareDatabase(client, url)
  await migrateDatabase(db)
  await seedDemo(db, { filesDir: filesDirFor(url) })
  client.close()
}

export interface Stack {
  baseUrl: string
  mailUrl: string
  databaseUrl: string
  smtpPort: number
  smtp: FakeSmtp | null
  /** The fake S3 when started with `storage: 's3'` (its setDown() switches storage off for a test). */
  s3: FakeS3 | null
  /** The secrets the server was started with (session password, Stripe keys): none may ever appear in its log. */
  secrets: string[]
  stop: () => Promise<void>
}

export async function startStack(opts: { label?: string, env?: Record<string, string>, startSmtp?: boolean, storage?: 'local' | 's3', logFile?: string } = {}): Promise<Stack> {
  const entry = resolve(ROOT, process.env.NUXT_OUTPUT_DIR || '.output', 'server/index.mjs')
  if (!existsSync(entry)) throw new Error('No built server in .output: run `npm run build` (the test command does it for you).')
  const databaseUrl = tempDatabaseUrl(opts.label ?? 'stack')
  await resetDatabase(databaseUrl)
  const smtpPort = await freePort()
  const smtp = opts.startSmtp === false ? null : await startFakeSmtp({ smtpPort, httpPort: 0, quiet: true })
  const port = await freePort()
  const baseUrl = `http://127.0.0.1:${port}`
  // The fake Stripe (fake-services/stripe), delivering signed webhooks to this server.
  const stripeWebhookSecret = `whsec_test_${randomBytes(12).toString('hex')}`
  const stripe = await startFakeStripe({ port: 0, webhookUrl: `${baseUrl}/api/webhooks/stripe`, webhookSecret: stripeWebhookSecret, quiet: true })
  // With `storage: 's3'`, files go to the fake S3 (fake-services/s3) instead of FILES_DIR.
  const s3 = opts.storage === 's3' ? await startFakeS3({ directory: `${filesDirFor(databaseUrl)}-s3`, quiet: true }) : null
  const child: ChildProcess = spawn(process.execPath, [entry], {
    cwd: ROOT,
    env: {
      ...process.env,
      NODE_ENV: 'production',
      PORT: String(port),
      HOST: '127.0.0.1',
      DATABASE_URL: databaseUrl,
      FILES_DIR: filesDirFor(databaseUrl),
      UPLOAD_STAGING_DIR: stagingDirFor(databaseUrl),
      // The cleanup of expired homework uploads looks every second.
      UPLOAD_CLEANUP_INTERVAL_MS: '1000',
      // The orphan-file sweep looks every second (it removes only files older than an hour).
      FILE_SWEEP_INTERVAL_MS: '1000',
      ...(s3?.env ?? {}),
      NUXT_SESSION_PASSWORD: TEST_SESSION_PASSWORD,
      SMTP_HOST: '127.0.0.1',
      SMTP_PORT: String(smtpPort),
      APP_URL: baseUrl,
      STRIPE_SECRET_KEY: 'sk_test_fake',
      STRIPE_WEBHOOK_SECRET: stripeWebhookSecret,
      STRIPE_API_HOST: '127.0.0.1',
      STRIPE_API_PORT: String(stripe.port),
      STRIPE_API_PROTOCOL: 'http',
      OUTBOX_INTERVAL_MS: '250',
      // The periodic sample-stock check looks every second (it only refreshes households whose status is stale).
      SAMPLE_CHECK_INTERVAL_MS: '1000',
      // The hourly invoice job (scheduled instalments, overdue reminders) is driven by its route in the tests instead.
      INVOICE_SCHEDULE: 'off',
      // Reminder e-mails are driven by their route (POST /api/reminders/run) in the tests, so runs are deterministic.
      REMINDERS: 'off',
      // Registers /__test/fault, a route that fails with a 500 (server/plugins/request-context.ts); never in production.
      TEST_FAULTS: '1',
      ...opts.env,
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  })
  let output = ''
  // With logFile, everything the server prints (its JSON log lines) is kept there too, for the tests to read.
  const log = opts.logFile ? createWriteStream(opts.logFile, { flags: 'a' }) : null
  child.stdout?.on('data', (d) => { output += d; log?.write(d) })
  child.stderr?.on('data', (d) => { output += d; log?.write(d) })
  const deadline = Date.now() + 30_000
  for (;;) {
    if (child.exitCode !== null) throw new Error(`The server exited during start-up:\n${output}`)
    try {
      const res = await fetch(`${baseUrl}/api/auth/me`)
      if (res.status === 401) break
    }
    catch { /* not listening yet */ }
    if (Date.now() > deadline) throw new Error(`The server did not start within 30 s:\n${output}`)
    await new Promise(r => setTimeout(r, 150))
  }
  return {
    baseUrl,
    mailUrl: smtp ? `http://127.0.0.1:${smtp.httpPort}` : '',
    databaseUrl,
    smtpPort,
    smtp,
    s3,
    secrets: [TEST_SESSION_PASSWORD, stripeWebhookSecret, 'sk_test_fake'],
    async stop() {
      child.kill('SIGTERM')
      await new Promise(r => (child.exitCode !== null ? r(null) : child.once('exit', r)))
      await new Promise(r => (log ? log.end(r) : r(null)))
      await smtp?.close()
      await stripe.close()
      await s3?.close()
    },
  }
}
