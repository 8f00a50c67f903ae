import { z } from 'zod'

// A logo by its content hash (signed-in people: it heads the documents and printed reports they see).
export default defineEventHandler(async (event) => {
  requireUser(event)
  const { id } = getValidatedParams(event, z.object({ id: z.string().regex(/^[0-9a-f]{64}$/, 'Not a logo id.') }))
  const logo = await readBusinessLogo(id)
  if (!logo) notFound('logo')
  setResponseHeaders(event, { 'content-type': logo.mime, 'cache-control': 'private, max-age=31536000, immutable', 'x-content-type-options': 'nosniff' })
  return logo.bytes
})
