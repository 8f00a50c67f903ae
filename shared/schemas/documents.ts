import { z } from 'zod'
import { DOCUMENT_KINDS, TITLE_MAX } from '../utils/documents'

export const documentKind = z.enum(DOCUMENT_KINDS, {
  errorMap: () => ({ message: 'Choose what kind of document this is.' }),
})

export const documentTitle = z.string({ required_error: 'Give the document a title.' }).trim()
  .min(1, 'Give the document a title.')
  .max(TITLE_MAX, `Use at most ${TITLE_MAX} characters.`)

/** The text fields sent with an upload (the file itself is checked by its bytes on the server). */
export const documentUploadSchema = z.object({
  kind: documentKind,
  // Optional: an empty title means "use the file's name".
  title: z.string().trim().max(TITLE_MAX, `Use at most ${TITLE_MAX} characters.`).optional()
    .transform(v => (v ? v : undefined)),
})
export type DocumentUploadInput = z.infer<typeof documentUploadSchema>

/** Renaming a document or changing its kind. */
export const documentPatchSchema = z.object({
  title: documentTitle.optional(),
  kind: documentKind.optional(),
}).refine(v => v.title !== undefined || v.kind !== undefined, { message: 'Change the title or the kind.' })
export type DocumentPatchInput = z.infer<typeof documentPatchSchema>

/** `?inline=1` shows a PDF or an image in the browser instead of downloading it. */
export const documentDownloadQuery = z.object({
  inline: z.enum(['0', '1', 'true', 'false']).optional().transform(v => v === '1' || v === 'true'),
})

/** The dog's photo has no text fields besides the file. */
export const dogPhotoSchema = z.object({})
