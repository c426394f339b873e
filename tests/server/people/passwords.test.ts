import { describe, it, expect } from 'vitest'
import { hashPassword, verifyPassword } from '../../../server/auth/passwords'

describe('password hashing (scrypt)', () => {
  it('stores a salted scrypt hash that verifies only the right password', async () => {
    const a = await hashPassword('correct horse battery')
    const b = await hashPassword('correct horse battery')
    expect(a).toMatch(/^scrypt\$16384\$8\$1\$[\w-]+\$[\w-]+$/)
    expect(a).not.toBe(b)
    expect(await verifyPassword('correct horse battery', a)).toBe(true)
    expect(await verifyPassword('correct horse batterY', a)).toBe(false)
  })
  it('normalises Unicode (NFKC) so the same password typed differently matches', async () => {
    const h = await hashPassword('ﬁne-pässwörd') // "ﬁ" ligature and precomposed umlauts
    expect(await verifyPassword('fine-pa\u0308sswo\u0308rd', h)).toBe(true)
  })
  it('never matches a missing or malformed hash', async () => {
    expect(await verifyPassword('x', null)).toBe(false)
    expect(await verifyPassword('x', 'plain-text')).toBe(false)
    expect(await verifyPassword('x', 'scrypt$1$2$3')).toBe(false)
  })
})
