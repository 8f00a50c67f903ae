import type { H3Event } from 'h3'
import type { ZodError, ZodTypeAny, z } from 'zod'

/** Field errors keyed by dotted path, the shape the forms show beside each field. */
export function fieldErrorsOf(error: ZodError): Record<string, string> {
  const out: Record<string, string> = {}
  for (const issue of error.issues) {
    const key = issue.path.join('.') || '_'
    out[key] ??= issue.message
  }
  return out
}

function invalid(error: ZodError, what: string): never {
  const fieldErrors = fieldErrorsOf(error)
  const summary = Object.entries(fieldErrors).map(([k, m]) => (k === '_' ? m : `${k}: ${m}`)).join(' ')
  throw createError({
    statusCode: 422,
    statusMessage: 'Unprocessable Content',
    message: `Please correct the ${what}. ${summary}`.trim(),
    data: { fieldErrors },
  })
}

/** Reads a JSON body and validates it with the shared zod schema: 400 for broken JSON, 422 with field errors. */
export async function readValidatedJson<S extends ZodTypeAny>(event: H3Event, schema: S): Promise<z.output<S>> {
  // At most the route class's size (413 past it, never parsed), then parsed as strict JSON.
  const raw = (await readBodyCapped(event, bodyLimitOf(event))).toString('utf8')
  let body: unknown
  try {
    body = raw.trim() ? JSON.parse(raw) : undefined
  }
  catch {
    throw createError({ statusCode: 400, statusMessage: 'Bad Request', message: 'The request body is not valid JSON. Send a JSON object.' })
  }
  const result = schema.safeParse(body ?? {})
  if (!result.success) invalid(result.error, 'highlighted fields')
  return result.data
}

export function getValidatedQueryParams<S extends ZodTypeAny>(event: H3Event, schema: S): z.output<S> {
  const result = schema.safeParse(getQuery(event))
  if (!result.success) {
    const fieldErrors = fieldErrorsOf(result.error)
    throw createError({ statusCode: 400, statusMessage: 'Bad Request', message: `Invalid query: ${Object.entries(fieldErrors).map(([k, m]) => `${k}: ${m}`).join(' ')}`, data: { fieldErrors } })
  }
  return result.data
}

/** Route parameters that fail validation cannot name anything that exists: answer 404. */
export function getValidatedParams<S extends ZodTypeAny>(event: H3Event, schema: S): z.output<S> {
  const result = schema.safeParse(event.context.params ?? {})
  if (!result.success) throw createError({ statusCode: 404, statusMessage: 'Not Found', message: 'Nothing was found at this address.' })
  return result.data
}
