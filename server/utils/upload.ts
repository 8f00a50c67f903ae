// Reading a multipart/form-data upload with a size limit, and deciding the file's type from its bytes.
import type { H3Event } from 'h3'
import type { ZodTypeAny, z } from 'zod'
import { fileTypeFromBuffer } from 'file-type'
import { acceptedType, describeTypes, formatBytes, MULTIPART_OVERHEAD_BYTES, type AcceptedType } from '../../shared/utils/documents'

export interface UploadedForm {
  file: { name: string, bytes: Buffer } | null
  fields: Record<string, string>
}

function tooLarge(maxBytes: number): never {
  throw createError({
    statusCode: 413,
    statusMessage: 'Content Too Large',
    message: `The file is larger than the limit of ${formatBytes(maxBytes)}. Scan at a lower resolution, or split it into parts.`,
  })
}

/**
 * Reads a multipart/form-data request whose one file field is `file`: 415 when it is not multipart, 413 when the
 * body is larger than the file limit plus the form's framing (checked from Content-Length before reading, and again
 * while reading), 413 when the file itself is over the limit, 400 when the body cannot be parsed.
 */
export async function readUploadForm(event: H3Event, maxFileBytes: number): Promise<UploadedForm> {
  const contentType = getRequestHeader(event, 'content-type') ?? ''
  if (!/^multipart\/form-data\s*;.*boundary=/i.test(contentType)) {
    throw createError({ statusCode: 415, statusMessage: 'Unsupported Media Type', message: 'Send the file as multipart/form-data with the file in a field named "file".' })
  }
  const limit = maxFileBytes + MULTIPART_OVERHEAD_BYTES
  const body = new Uint8Array(await readBodyCapped(event, limit, () => tooLarge(maxFileBytes)))
  let form: FormData
  try {
    form = await new Response(body, { headers: { 'content-type': contentType } }).formData()
  }
  catch {
    throw createError({ statusCode: 400, statusMessage: 'Bad Request', message: 'The upload could not be read. Choose the file again and resend the form.' })
  }
  const fields: Record<string, string> = {}
  let file: UploadedForm['file'] = null
  for (const [name, value] of form.entries()) {
    if (typeof value === 'string') { fields[name] ??= value; continue }
    if (name === 'file' && !file) file = { name: value.name || 'upload', bytes: Buffer.from(await value.arrayBuffer()) }
  }
  if (file && file.bytes.length > maxFileBytes) tooLarge(maxFileBytes)
  return { file, fields }
}

/**
 * The file and the text fields validated with the shared zod schema, or one 422 listing every field's problem
 * (no file, an empty file, a bad field).
 */
export function validateUploadForm<S extends ZodTypeAny>(form: UploadedForm, schema: S): { file: { name: string, bytes: Buffer }, input: z.output<S> } {
  const fieldErrors: Record<string, string> = {}
  if (!form.file) fieldErrors.file = 'Choose a file to upload.'
  else if (form.file.bytes.length === 0) fieldErrors.file = 'This file is empty (0 bytes). Choose the file again, or save or scan it once more.'
  const parsed = schema.safeParse(form.fields)
  if (!parsed.success) Object.assign(fieldErrors, fieldErrorsOf(parsed.error))
  if (Object.keys(fieldErrors).length || !form.file || !parsed.success) {
    const message = Object.values(fieldErrors).join(' ') || 'Please correct the form.'
    throw createError({ statusCode: 422, statusMessage: 'Unprocessable Content', message, data: { fieldErrors } })
  }
  return { file: form.file, input: parsed.data }
}

/** The file's type judged by its bytes, or 415 naming the types we accept. */
export async function detectUploadType(bytes: Buffer, allowed: readonly AcceptedType[]): Promise<AcceptedType> {
  const detected = await fileTypeFromBuffer(bytes)
  const type = acceptedType(detected?.mime, allowed)
  if (!type) {
    const names = describeTypes(allowed)
    const message = `The contents of this file are not ${names}, whatever its name says. Save or scan it in one of those formats and try again.`
    throw createError({ statusCode: 415, statusMessage: 'Unsupported Media Type', message, data: { fieldErrors: { file: message } } })
  }
  return type
}

/** An upload whose file was written but whose record failed: the caller has removed the file; answer 503, not 500. */
export function uploadSaveFailed(err: unknown, what: string) {
  if (isError(err)) return err
  logFailure('upload.save', `Saving ${what} failed; the stored file was removed again.`, err)
  return createError({ statusCode: 503, statusMessage: 'Service Unavailable', message: `The ${what} could not be saved just now, and nothing was kept. Please try again in a moment.` })
}
