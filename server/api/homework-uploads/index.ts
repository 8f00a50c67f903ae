// The tus endpoint for homework videos: POST creates an upload (OPTIONS describes the server). Every method is
// handled here because the tus protocol uses several on one URL; see server/services/homework-uploads.ts.
export default defineEventHandler(event => handleHomeworkUploadRequest(event))
