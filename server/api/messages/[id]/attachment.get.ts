import { idParams } from '../../../../shared/schemas/common'

// A message's photo or PDF, through this authorized route only.
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  const { message } = await requireMessageAccess(event, id)
  if (!message.attachmentKey) notFound('attachment')
  return sendStoredFile(event, { storageKey: message.attachmentKey, contentType: message.attachmentType!, title: message.attachmentName!.replace(/\.[^.]+$/, '') }, { inline: getQuery(event).inline === '1' })
})
