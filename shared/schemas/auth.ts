import { z } from 'zod'
import { email, newPassword, personName } from './common'
import { HANDLER_RELATIONSHIPS } from '../utils/enums'

export const loginSchema = z.object({
  email,
  password: z.string({ required_error: 'Enter your password.' }).min(1, 'Enter your password.').max(200, 'Use at most 200 characters.'),
})
export type LoginInput = z.infer<typeof loginSchema>

export const forgotPasswordSchema = z.object({ email })

export const resetPasswordSchema = z.object({
  token: z.string({ required_error: 'This link is incomplete: open the whole link from the e-mail.' }).min(20, 'This link is incomplete: open the whole link from the e-mail.').max(200),
  password: newPassword,
})

export const changePasswordSchema = z.object({
  currentPassword: z.string().min(1, 'Enter your current password.').max(200),
  newPassword,
})

export const acceptInvitationSchema = z.object({
  password: newPassword,
  name: personName.optional(),
})

export const invitationSchema = z.discriminatedUnion('role', [
  z.object({ role: z.literal('trainer'), email, name: personName }),
  z.object({
    role: z.literal('handler'),
    email,
    name: personName,
    clientId: z.string({ required_error: 'Choose the client file.' }).min(1, 'Choose the client file.').max(64),
    relationship: z.enum(HANDLER_RELATIONSHIPS).default('self'),
  }),
], { errorMap: () => ({ message: 'Choose whom to invite: a trainer or a handler.' }) })
export type InvitationInput = z.infer<typeof invitationSchema>

export const userUpdateSchema = z.object({
  disabled: z.boolean().optional(),
  name: personName.optional(),
}).refine(v => v.disabled !== undefined || v.name !== undefined, 'Nothing to change: send disabled or name.')

// Second factor: a 6-digit code from the authenticator app, or one of the recovery codes.
export const secondFactorCodeSchema = z.object({
  code: z.string({ required_error: 'Enter the 6-digit code from your authenticator app.', invalid_type_error: 'Enter the 6-digit code from your authenticator app.' })
    .trim().regex(/^\d{3}\s?\d{3}$/, 'Enter the 6 digits shown in your authenticator app.'),
})
export const secondFactorSignInSchema = z.union([
  secondFactorCodeSchema,
  z.object({ recoveryCode: z.string({ invalid_type_error: 'Enter one of your recovery codes.' }).trim().min(10, 'Enter one of your recovery codes, like abcde-fghjk.').max(20, 'A recovery code has 10 letters and digits.') }),
], { errorMap: () => ({ message: 'Enter the 6-digit code from your authenticator app, or a recovery code.' }) })
export const secondFactorOffSchema = z.object({
  password: z.string({ required_error: 'Enter your password.' }).min(1, 'Enter your password.').max(200, 'Use at most 200 characters.'),
})
export type SecondFactorSignInInput = z.infer<typeof secondFactorSignInSchema>
