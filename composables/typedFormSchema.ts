import { toTypedSchema } from '@vee-validate/zod'
import type { ZodTypeAny } from 'zod'

/**
 * toTypedSchema for a form schema that transforms what a person types into what the route takes (e.g. '600.00' →
 * 60000 minor units). vee-validate "casts" initial values by parsing them, which would replace the typed fields
 * with the transformed output; this keeps the typed values and still hands handleSubmit the transformed ones.
 */
export function typedFormSchema<S extends ZodTypeAny>(schema: S) {
  const typed = toTypedSchema(schema)
  return { ...typed, cast: (values: unknown) => values } as unknown as typeof typed
}
