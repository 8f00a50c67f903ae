import { idParams } from '../../../../shared/schemas/common'

// The bytes of a homework video, for <video src>: the household's handlers, its trainer and the office; HTTP Range
// requests so it seeks and plays in every browser and on iOS. Files are never under public/.
export default defineEventHandler(async (event) => {
  const { id } = getValidatedParams(event, idParams)
  return sendHomeworkVideoFile(event, id)
})
