import { startStack } from '../support/stack'

// One stack for the browser tests; its addresses reach the test workers through the environment.
export default async function globalSetup() {
  const stack = await startStack({ label: 'e2e' })
  process.env.E2E_BASE_URL = stack.baseUrl
  process.env.E2E_MAIL_URL = stack.mailUrl
  process.env.E2E_DATABASE_URL = stack.databaseUrl
  return async () => stack.stop()
}
