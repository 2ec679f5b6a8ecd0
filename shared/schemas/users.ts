import { z } from 'zod'
import { ROLES } from '../utils/roles'
import { email, newPassword } from './auth'
import { text, updateSchema } from './fields'

export const userCreateSchema = z.object({
  email,
  name: text(120, 'Enter a name'),
  role: z.enum(ROLES, 'Choose owner, technician or customer'),
  password: newPassword,
  customerId: z.uuid('Choose a customer').nullish(),
}).refine(u => u.role !== 'customer' || !!u.customerId, {
  path: ['customerId'],
  message: 'A customer sign-in must be linked to a customer',
})
export type UserCreateInput = z.output<typeof userCreateSchema>

/** PATCH: exactly the fields sent change. */
export const userUpdateSchema = updateSchema({
  name: text(120, 'Enter a name'),
  role: z.enum(ROLES, 'Choose owner, technician or customer'),
  active: z.boolean('Choose true or false'),
  password: newPassword,
})
export type UserUpdateInput = z.output<typeof userUpdateSchema>
