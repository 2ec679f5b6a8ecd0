import { describe, expect, it } from 'vitest'
import { can, HOME_BY_ROLE, PERMISSIONS, ROLES } from '../../shared/utils/roles'
import { newPassword, signInSchema } from '../../shared/schemas/auth'
import { userCreateSchema } from '../../shared/schemas/users'
import { companyUpdateSchema } from '../../shared/schemas/company'

describe('roles', () => {
  it('gives each role a home', () => {
    for (const r of ROLES) expect(HOME_BY_ROLE[r]).toMatch(/^\//)
  })
  it('keeps staff management with the owner only', () => {
    expect(can('owner', 'users.manage')).toBe(true)
    expect(can('technician', 'users.manage')).toBe(false)
    expect(can('customer', 'users.manage')).toBe(false)
    expect(can('customer', 'portal.read')).toBe(true)
    expect(can('technician', 'today.read')).toBe(true)
  })
  it('lists only known roles in every permission', () => {
    for (const roles of Object.values(PERMISSIONS)) for (const r of roles) expect(ROLES).toContain(r)
  })
})

describe('shared schemas', () => {
  it('normalises the sign-in e-mail', () => {
    expect(signInSchema.parse({ email: ' Mara@Heronmere.Example ', password: 'x' }).email).toBe('mara@heronmere.example')
  })
  it('applies the password policy: 10 to 128 characters', () => {
    expect(newPassword.safeParse('short-pw').success).toBe(false)
    expect(newPassword.safeParse('demo-pond-2026').success).toBe(true)
    expect(newPassword.safeParse('x'.repeat(129)).success).toBe(false)
  })
  it('requires a customer link for customer sign-ins', () => {
    const r = userCreateSchema.safeParse({ email: 'a@b.example', name: 'A', role: 'customer', password: 'long-enough-pw' })
    expect(r.success).toBe(false)
    expect(r.error!.issues[0]!.path).toEqual(['customerId'])
  })
  it('checks currency codes and time zones', () => {
    expect(companyUpdateSchema.safeParse({ currency: 'usd' }).data?.currency).toBe('USD')
    expect(companyUpdateSchema.safeParse({ currency: 'XYZ1' }).success).toBe(false)
    expect(companyUpdateSchema.safeParse({ timeZone: 'America/Chicago' }).success).toBe(true)
    expect(companyUpdateSchema.safeParse({ timeZone: 'Mars/Olympus' }).success).toBe(false)
    expect(companyUpdateSchema.safeParse({}).success).toBe(false)
  })
})
