import { and, eq, sql } from 'drizzle-orm'
import { drizzle } from 'drizzle-orm/node-postgres'
import * as schema from '../server/db/schema'
const { companies, visits } = schema
const db = drizzle({ connection: 'postgres://x@127.0.0.1:1/x', schema })
const time = (name: string, f: () => unknown) => { for (let i = 0; i < 2000; i++) f(); const t = performance.now(); for (let i = 0; i < 20000; i++) f(); console.log(name, ((performance.now() - t) / 20000 * 1000).toFixed(1), 'µs') }
time('2 cols by id', () => db.select({ a: companies.baseLatitude, b: companies.baseLongitude }).from(companies).where(eq(companies.id, 'x')).limit(1).toSQL())
time('whole row by id', () => db.select().from(companies).where(eq(companies.id, 'x')).limit(1).toSQL())
time('visits 3 filters', () => db.select({ id: visits.id }).from(visits).where(and(eq(visits.companyId, 'a'), eq(visits.technicianId, 'b'))).toSQL())
const p = db.select({ a: companies.baseLatitude }).from(companies).where(eq(companies.id, sql.placeholder('id'))).limit(1).prepare('x')
console.log(typeof p.execute)
