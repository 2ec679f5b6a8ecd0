import { spawnSync } from 'node:child_process'
import { resolve } from 'node:path'
import { describe, expect, inject, it } from 'vitest'
import pg from 'pg'

const root = resolve(import.meta.dirname, '../..')

async function counts() {
  const c = new pg.Client({ connectionString: inject('databaseUrl') })
  await c.connect()
  const { rows } = await c.query(`select (select count(*) from companies)::int as companies,
    (select count(*) from companies where name = 'Heronmere Water Gardens')::int as demo_companies,
    (select count(*) from invoices)::int as invoices,
    (select count(*) from customers)::int as customers,
    (select count(*) from users where email like '%.example' and email not like '%@test.example')::int as demo_users,
    (select max(updated_at) from users where email like '%heronmere.example') as staff_updated`)
  await c.end()
  return rows[0]
}

describe('demo seed', () => {
  it('is idempotent: running it again changes nothing', async () => {
    const before = await counts()
    const r = spawnSync(resolve(root, 'node_modules/.bin/tsx'), ['scripts/seed.ts'], { cwd: root, env: { ...process.env, DATABASE_URL: inject('databaseUrl') }, encoding: 'utf8' })
    expect(r.status, r.stderr).toBe(0)
    expect(r.stderr).toMatch(/nothing changed/)
    expect(await counts()).toEqual(before)
    // The scenario of PRODUCT.md: one company, thirty-odd customers, owner + two technicians
    // (other tests add companies of their own, e.g. the billing book).
    expect(before.demo_companies).toBe(1)
    expect(before.customers).toBeGreaterThanOrEqual(30)
  })
})
