import { z } from 'zod'
import { ROLES } from '../utils/roles'
import { email, newPassword } from './auth'

export const userCreateSchema = z.object({
  email,
  name: z.string().trim().min(1, 'Enter a name').max(120),
  role: z.enum(ROLES, 'Choose owner, technician or customer'),
  password: newPassword,
  customerId: z.uuid('Choose a customer').nullish(),
}).refine(u => u.role !== 'customer' || !!u.customerId, {
  path: ['customerId'],
  message: 'A customer sign-in must be linked to a customer',
})
export type UserCreateInput = z.output<typeof userCreateSchema>

export const userUpdateSchema = z.object({
  name: z.string().trim().min(1, 'Enter a name').max(120).optional(),
  role: z.enum(ROLES, 'Choose owner, technician or customer').optional(),
  active: z.boolean().optional(),
  password: newPassword.optional(),
}).refine(v => Object.keys(v).length > 0, { message: 'Nothing to change', path: ['_'] })
export type UserUpdateInput = z.output<typeof userUpdateSchema>
