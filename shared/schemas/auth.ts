import { z } from 'zod'
import { ROLES } from '../roles'
import { safeString } from './common'

/** Password policy: long enough to resist guessing; no composition rules (common practice, NIST SP 800-63B). */
export const passwordSchema = z.string().min(10, 'Use at least 10 characters').max(200)

export const loginSchema = z.object({
  email: z.email('Enter a valid e-mail address').max(190),
  password: z.string().min(1, 'Enter your password').max(200),
})
export type LoginInput = z.infer<typeof loginSchema>

export const changePasswordSchema = z.object({
  currentPassword: z.string().min(1, 'Enter your current password').max(200),
  newPassword: passwordSchema,
})
export type ChangePasswordInput = z.infer<typeof changePasswordSchema>

export const acceptInviteSchema = z.object({
  token: z.string().regex(/^[A-Za-z0-9_-]{20,100}$/, 'This invitation link is not valid'),
  password: passwordSchema,
})
export type AcceptInviteInput = z.infer<typeof acceptInviteSchema>

export const roleSchema = z.enum(ROLES)

export const inviteSchema = z.object({
  email: z.email('Enter a valid e-mail address').max(190),
  name: safeString().min(2, 'Enter the full name').max(120),
  roles: z.array(roleSchema).min(1, 'Pick at least one role').max(ROLES.length),
})
export type InviteInput = z.infer<typeof inviteSchema>

/** A change of a person; a change of roles or of the active flag needs a reason (kept in the audit trail). */
export const updateUserSchema = z
  .object({
    name: safeString().min(2, 'Enter the full name').max(120).optional(),
    roles: z.array(roleSchema).min(1, 'Pick at least one role').max(ROLES.length).optional(),
    active: z.boolean().optional(),
    reason: z
      .string()
      .trim()
      .max(500)
      .optional()
      .transform((v) => v || undefined),
  })
  .refine((v) => Object.keys(v).some((k) => k !== 'reason'), { message: 'Nothing to change' })

/** An administrator's action on a person's account (end their sessions, send a password-reset link): why. */
export const accountActionSchema = z.object({
  reason: z.string({ error: 'Say why' }).trim().min(1, 'Say why').max(500),
})
export type UpdateUserInput = z.input<typeof updateUserSchema>

export { idParamSchema } from './common'

export const searchQuerySchema = z.object({
  q: safeString().min(1, 'Type something to search for').max(100),
})
