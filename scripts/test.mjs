#!/usr/bin/env node
// The one test command (README "Quick start", and .ci/run): lint, type-check, build, unit + integration tests against
// the built server, then the Chromium end-to-end tests. Each step starts and stops the services it needs.
import { spawnSync } from 'node:child_process'
import { existsSync } from 'node:fs'

const CHROMIUM = process.env.CHROMIUM_PATH || '/usr/bin/chromium'
const started = Date.now()

function run(label, cmd, args, env = {}) {
  const t0 = Date.now()
  console.log(`\n▶ ${label}`)
  const res = spawnSync(cmd, args, { stdio: 'inherit', env: { ...process.env, ...env } })
  const secs = ((Date.now() - t0) / 1000).toFixed(1)
  if (res.status !== 0) {
    console.error(`✖ ${label} failed after ${secs} s`)
    process.exit(res.status ?? 1)
  }
  console.log(`✔ ${label} (${secs} s)`)
}

function ensureChromium() {
  if (existsSync(CHROMIUM)) return
  const isRoot = typeof process.getuid === 'function' && process.getuid() === 0
  if (!isRoot) {
    console.error(`Chromium is missing at ${CHROMIUM}. Install Debian's package first:\n  sudo apt-get update && sudo apt-get install -y chromium\n(or set CHROMIUM_PATH to a Chromium binary).`)
    process.exit(1)
  }
  console.log('Chromium is missing: installing Debian\'s chromium package…')
  run('apt-get update', 'apt-get', ['update', '-qq'])
  run('apt-get install chromium', 'apt-get', ['install', '-y', '-qq', 'chromium'], { DEBIAN_FRONTEND: 'noninteractive' })
}

const only = process.argv[2] // optional: unit | integration | e2e
ensureChromium()
if (!only) run('Lint (ESLint with the Nuxt rules)', 'npx', ['eslint', '.'])
if (!only) run('Type-check (vue-tsc through nuxi typecheck)', 'npx', ['nuxi', 'typecheck'])
if (!only || only !== 'unit') {
  if (process.env.SKIP_BUILD !== '1') run('Build the server (nuxt build)', 'npx', ['nuxi', 'build'], { NODE_ENV: 'production' })
}
if (!only || only === 'unit') run('Unit tests (vitest, shared/ logic)', 'npx', ['vitest', 'run', '--project', 'unit'])
if (!only || only === 'integration') run('Integration tests (vitest, built server + SQLite + fake SMTP)', 'npx', ['vitest', 'run', '--project', 'integration'])
if (!only || only === 'e2e') run('End-to-end tests (Playwright in Chromium)', 'npx', ['playwright', 'test'])
console.log(`\nAll tests passed in ${((Date.now() - started) / 1000).toFixed(0)} s.`)
