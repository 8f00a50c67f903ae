// Starts setting up a second factor: a new secret as a QR code for the authenticator app (and as text to type).
export default defineEventHandler(async (event) => {
  const user = requireUser(event)
  return startSecondFactorEnrolment(user)
})
