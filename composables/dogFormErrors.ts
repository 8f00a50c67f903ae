/**
 * Shows a refused save in a dog-profile form: field errors go beside their fields (and the top alert stays quiet
 * when every one of them has a field on this form); anything else shows as the form's alert.
 */
export function dogFormProblem(err: unknown, setErrors: (e: Record<string, string>) => void, fields: string[], fallback: string): string | null {
  const fieldErrors = apiFieldErrors(err)
  setErrors(fieldErrors)
  const keys = Object.keys(fieldErrors)
  const placed = keys.length > 0 && keys.every(k => fields.some(f => k === f || k.startsWith(`${f}.`)))
  return placed ? null : apiErrorMessage(err, fallback)
}
