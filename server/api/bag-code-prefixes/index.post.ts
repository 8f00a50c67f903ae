// Reserves a bag-code prefix for the calling phone (anyone signed in who may collect samples): the phone then makes
// bag codes with it even with no signal, and no other phone ever makes the same code (shared/utils/bag-codes.ts).
export default defineEventHandler(async (event) => {
  const user = requireUser(event)
  setResponseStatus(event, 201)
  return reserveBagCodePrefix(user)
})
