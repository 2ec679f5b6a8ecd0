import { z } from 'zod'
import { safeString } from './fields'

export const email = safeString('The e-mail address').trim().toLowerCase().pipe(z.email('Enter a valid e-mail address')).pipe(z.string().max(254))

export const signInSchema = z.object({
  email,
  password: safeString('The password').min(1, 'Enter your password').max(256, 'Password is too long'),
})
export type SignInInput = z.output<typeof signInSchema>

/** Password policy: long enough to resist guessing; no composition rules (NIST SP 800-63B). */
/**
 * Password policy after NIST SP 800-63B (from memory): at least 10 characters, no composition
 * rules, and not one of the passwords people pick first (a short list here; a breached-password
 * service would be better in production).
 */
export const COMMON_PASSWORDS = new Set([
  '1234567890', '12345678910', '0123456789', '1111111111', '0000000000', 'password12', 'password123', 'password1234',
  'qwertyuiop', 'qwerty1234', '1q2w3e4r5t', 'iloveyou12', 'letmein123', 'welcome123', 'abcdefghij', 'abc1234567',
  'passw0rd12', 'administrator', 'changeme123', 'trustno1234',
])
export const newPassword = safeString('The password')
  .min(10, 'Use at least 10 characters')
  .max(128, 'Use at most 128 characters')
  .refine(p => !COMMON_PASSWORDS.has(p.toLowerCase()) && !/^(.)\1+$/.test(p), 'This password is too common; choose another')
