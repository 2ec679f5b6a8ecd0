import { z } from 'zod'

export const email = z.string().trim().toLowerCase().pipe(z.email('Enter a valid e-mail address')).pipe(z.string().max(254))

export const signInSchema = z.object({
  email,
  password: z.string().min(1, 'Enter your password').max(256, 'Password is too long'),
})
export type SignInInput = z.output<typeof signInSchema>

/** Password policy: long enough to resist guessing; no composition rules (NIST SP 800-63B). */
export const newPassword = z.string()
  .min(10, 'Use at least 10 characters')
  .max(128, 'Use at most 128 characters')
