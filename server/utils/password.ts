import { hash, verify } from '@node-rs/argon2'

// argon2id with OWASP's minimum parameters (19 MiB, 2 passes, 1 lane).
const ARGON = { memoryCost: 19456, timeCost: 2, parallelism: 1 }

export function hashPassword(password: string) {
  return hash(password, ARGON)
}

export function verifyPassword(passwordHash: string, password: string) {
  return verify(passwordHash, password).catch(() => false)
}
