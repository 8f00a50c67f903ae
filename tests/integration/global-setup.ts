import { existsSync, readFileSync, rmSync } from 'node:fs'
import { resolve } from 'node:path'
import type { TestProject } from 'vitest/node'
import { DEMO_PASSWORD } from '../../scripts/lib/seed-data'
import { SECRETS_USED_FILE } from '../support/http'
import { ROOT, startStack } from '../support/stack'

declare module 'vitest' {
  export interface ProvidedContext { baseUrl: string, mailUrl: string, databaseUrl: string, serverLog: string }
}

// Card numbers of the fake Stripe's test cards (Stripe's documented test cards, from memory), plain and spaced.
const CARD_NUMBERS = ['4242424242424242', '4242 4242 4242 4242', '4000000000000002', '4000 0000 0000 0002']

/**
 * After the whole suite: the server's log must hold none of the passwords, cookies, tokens, card numbers and
 * secrets the tests used (OWASP ASVS 4.0 V7.1.1 and V7.1.2). Fails the run, naming what leaked, if it does.
 */
export function findSecretsInLog(logFile: string, extra: string[]): string[] {
  const log = readFileSync(logFile, 'utf8')
  const noted = existsSync(SECRETS_USED_FILE) ? readFileSync(SECRETS_USED_FILE, 'utf8').split('\n') : []
  const secrets = [...new Set([...noted, ...extra, DEMO_PASSWORD, ...CARD_NUMBERS].map(s => s.trim()).filter(s => s.length >= 8 && !/^(.)\1*$/.test(s)))]
  // (A made-up value of one repeated character, such as a token of 43 "z", is not a secret.)
  return secrets.filter(s => log.includes(s))
}

export default async function setup(project: TestProject) {
  const serverLog = resolve(ROOT, 'tests/.tmp/integration-server.log')
  rmSync(serverLog, { force: true })
  rmSync(SECRETS_USED_FILE, { force: true })
  const stack = await startStack({ label: 'integration', logFile: serverLog })
  project.provide('baseUrl', stack.baseUrl)
  project.provide('mailUrl', stack.mailUrl)
  project.provide('databaseUrl', stack.databaseUrl)
  project.provide('serverLog', serverLog)
  return async () => {
    await stack.stop()
    const leaked = findSecretsInLog(serverLog, stack.secrets)
    const lines = readFileSync(serverLog, 'utf8').split('\n').filter(Boolean).length
    if (leaked.length) throw new Error(`The server's log (${serverLog}) holds ${leaked.length} secret(s) the tests used: ${leaked.map(s => `${s.slice(0, 4)}…`).join(', ')}`)
    console.log(`Server log checked: ${lines} lines, none holds any of the passwords, cookies, tokens, card numbers or secrets used.`)
  }
}
