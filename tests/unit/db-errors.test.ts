import { describe, expect, it } from 'vitest'
import { isDatabaseDown, isLockTimeout, isWriteConflict } from '../../server/utils/db'

// Errors as pg raises them (a DatabaseError with PostgreSQL's SQLSTATE in `code`) and as Drizzle
// wraps them (its query error, with the pg error as `cause`). SQLSTATEs from PostgreSQL's
// documentation, Appendix A "PostgreSQL Error Codes".
const pgError = (code: string, message: string) => Object.assign(new Error(message), { code })
const wrapped = (cause: Error) => Object.assign(new Error('Failed query: update visits …'), { cause })

describe('database errors the server answers with 503', () => {
  it('a deadlock or a serialization failure, bare or wrapped, is a write conflict', () => {
    expect(isWriteConflict(pgError('40P01', 'deadlock detected'))).toBe(true)
    expect(isWriteConflict(wrapped(pgError('40P01', 'deadlock detected')))).toBe(true)
    expect(isWriteConflict(wrapped(pgError('40001', 'could not serialize access due to concurrent update')))).toBe(true)
  })
  it('a bad query or a broken rule is not', () => {
    expect(isWriteConflict(wrapped(pgError('23505', 'duplicate key value violates unique constraint')))).toBe(false)
    expect(isWriteConflict(wrapped(pgError('42703', 'column "x" does not exist')))).toBe(false)
    expect(isWriteConflict(new Error('plain'))).toBe(false)
    expect(isWriteConflict(undefined)).toBe(false)
  })
  it('a write conflict is not an outage, and an outage is not a write conflict', () => {
    expect(isDatabaseDown(wrapped(pgError('40P01', 'deadlock detected')))).toBe(false)
    expect(isWriteConflict(wrapped(pgError('57P01', 'terminating connection due to administrator command')))).toBe(false)
    expect(isDatabaseDown(wrapped(pgError('57P01', 'terminating connection due to administrator command')))).toBe(true)
  })
})

describe('a lock not granted in time', () => {
  it('is told apart from a deadlock and from any other error', () => {
    expect(isLockTimeout(wrapped(pgError('55P03', 'canceling statement due to lock timeout')))).toBe(true)
    expect(isLockTimeout(wrapped(pgError('40P01', 'deadlock detected')))).toBe(false)
    expect(isWriteConflict(wrapped(pgError('55P03', 'canceling statement due to lock timeout')))).toBe(false)
    expect(isLockTimeout(new Error('plain'))).toBe(false)
  })
})
