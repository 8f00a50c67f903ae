import type { FetchError } from 'ofetch'

/** A message a person can act on, from an API error. */
export function apiErrorMessage(err: unknown, fallback = 'Something went wrong. Please try again.'): string {
  const e = err as FetchError<{ message?: string, statusMessage?: string }> | undefined
  if (e?.data?.message) return e.data.message
  if (e?.statusCode === undefined && e?.message?.includes('fetch')) return 'No connection to Forescent. Check your signal and try again.'
  return e?.statusMessage || fallback
}

export function apiFieldErrors(err: unknown): Record<string, string> {
  const e = err as FetchError<{ data?: { fieldErrors?: Record<string, string> } }> | undefined
  return e?.data?.data?.fieldErrors ?? {}
}
