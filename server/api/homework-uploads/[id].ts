// One tus upload of a homework video: HEAD (how much has arrived), PATCH (more bytes), DELETE (give up), OPTIONS.
// Only the person who started it may touch it; see server/services/homework-uploads.ts.
export default defineEventHandler(event => handleHomeworkUploadRequest(event, getRouterParam(event, 'id') ?? ''))
