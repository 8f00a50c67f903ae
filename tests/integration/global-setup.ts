import type { TestProject } from 'vitest/node'
import { startStack } from '../support/stack'

declare module 'vitest' {
  export interface ProvidedContext { baseUrl: string, mailUrl: string, databaseUrl: string }
}

export default async function setup(project: TestProject) {
  const stack = await startStack({ label: 'integration' })
  project.provide('baseUrl', stack.baseUrl)
  project.provide('mailUrl', stack.mailUrl)
  project.provide('databaseUrl', stack.databaseUrl)
  return async () => stack.stop()
}
