// `npm run demo`: a fresh demo database, the fake services and the built app, with the sign-ins printed.
import { spawn, spawnSync } from 'node:child_process'
import { existsSync, rmSync } from 'node:fs'
import { resolve } from 'node:path'
import { migrateDatabase, openDatabase, prepareDatabase } from '../server/database/client'
import { startFakeSmtp } from '../fake-services/smtp/server.mjs'
import { startFakeStripe } from '../fake-services/stripe/server.mjs'
import { seedDemo, PEOPLE, DEMO_PASSWORD, BUSINESS_NAME } from './lib/seed-data'

const root = resolve(import.meta.dirname, '..')
const port = Number(process.env.PORT || 3000)
const smtpPort = Number(process.env.FAKE_SMTP_PORT || 2525)
const mailHttpPort = Number(process.env.FAKE_SMTP_HTTP_PORT || 8025)
const dbFile = resolve(root, 'data/demo.db')
const databaseUrl = process.env.DATABASE_URL || `file:${dbFile}`
const appUrl = process.env.APP_URL || `http://localhost:${port}`

if (process.env.DEMO_SKIP_BUILD !== '1' || !existsSync(resolve(root, '.output/server/index.mjs'))) {
  console.log('Building the app (about a minute the first time)…')
  const built = spawnSync('npx', ['nuxi', 'build'], { cwd: root, stdio: ['ignore', 'ignore', 'inherit'], env: { ...process.env, NODE_ENV: 'production' } })
  if (built.status !== 0) process.exit(built.status ?? 1)
}

if (!process.env.DATABASE_URL) for (const f of [dbFile, `${dbFile}-wal`, `${dbFile}-shm`]) rmSync(f, { force: true })
const { client, db } = openDatabase(databaseUrl)
await prepareDatabase(client, databaseUrl)
await migrateDatabase(db)
await seedDemo(db)
client.close()

const smtp = await startFakeSmtp({ smtpPort, httpPort: mailHttpPort, quiet: true })
// The fake Stripe: card payments on its own test page, signed webhooks to the app (fake-services/stripe).
const stripePort = Number(process.env.FAKE_STRIPE_PORT || 12111)
const stripeWebhookSecret = process.env.STRIPE_WEBHOOK_SECRET || 'whsec_demo_not_for_production'
const stripe = await startFakeStripe({ port: stripePort, webhookUrl: `http://127.0.0.1:${port}/api/webhooks/stripe`, webhookSecret: stripeWebhookSecret, quiet: true })
const app = spawn(process.execPath, [resolve(root, '.output/server/index.mjs')], {
  cwd: root,
  stdio: 'inherit',
  env: {
    ...process.env,
    PORT: String(port),
    DATABASE_URL: databaseUrl,
    // A fixed secret is fine for the local demo only; production sets its own (README "Configuration").
    NUXT_SESSION_PASSWORD: process.env.NUXT_SESSION_PASSWORD || 'forescent-demo-session-secret-not-for-production',
    SMTP_HOST: '127.0.0.1',
    SMTP_PORT: String(smtpPort),
    APP_URL: appUrl,
    STRIPE_SECRET_KEY: 'sk_test_demo',
    STRIPE_WEBHOOK_SECRET: stripeWebhookSecret,
    STRIPE_API_HOST: '127.0.0.1',
    STRIPE_API_PORT: String(stripePort),
    STRIPE_API_PROTOCOL: 'http',
  },
})

const width = Math.max(...PEOPLE.map(p => p.email.length))
console.log(`
Forescent demo: ${BUSINESS_NAME} (an invented business)
  App            ${appUrl}
  Mail inbox     http://localhost:${mailHttpPort}   (every e-mail the app sends lands here)
  Card payments  http://localhost:${stripePort}   (fake Stripe; test card 4242 4242 4242 4242)
  Database       ${databaseUrl}

Sign in with any of these; the password is "${DEMO_PASSWORD}":
${PEOPLE.filter(p => p.email.endsWith('@forescent.test')).map(p => `  ${p.email.padEnd(width)}  ${p.role.padEnd(8)} ${p.name}`).join('\n')}

Press Ctrl+C to stop.`)

const stop = async () => {
  app.kill('SIGTERM')
  await smtp.close()
  await stripe.close()
  process.exit(0)
}
process.on('SIGINT', stop)
process.on('SIGTERM', stop)
app.on('exit', async (code) => {
  await smtp.close()
  await stripe.close()
  process.exit(code ?? 0)
})
