import { scrypt, randomBytes, timingSafeEqual, type ScryptOptions } from 'node:crypto'

/** scrypt parameters (N=2^14, r=8, p=1): the interactive-login setting commonly recommended for scrypt. */
const N = 16384,
  R = 8,
  P = 1,
  KEYLEN = 64
const MAXMEM = 64 * 1024 * 1024

function scryptAsync(password: string, salt: Buffer, keylen: number, opts: ScryptOptions): Promise<Buffer> {
  return new Promise((resolve, reject) =>
    scrypt(password, salt, keylen, opts, (err, key) => (err ? reject(err) : resolve(key))),
  )
}

/** Hash a password as `scrypt$N$r$p$salt$hash` (base64url parts), salted with 16 random bytes. */
export async function hashPassword(password: string): Promise<string> {
  const salt = randomBytes(16)
  const key = await scryptAsync(password.normalize('NFKC'), salt, KEYLEN, { N, r: R, p: P, maxmem: MAXMEM })
  return ['scrypt', N, R, P, salt.toString('base64url'), key.toString('base64url')].join('$')
}

/** Check a password against a stored hash with a timing-safe compare. Malformed hashes never match. */
export async function verifyPassword(password: string, stored: string | null | undefined): Promise<boolean> {
  if (!stored) return false
  const parts = stored.split('$')
  if (parts.length !== 6 || parts[0] !== 'scrypt') return false
  const [, n, r, p, saltB64, keyB64] = parts
  const expected = Buffer.from(keyB64, 'base64url')
  const key = await scryptAsync(password.normalize('NFKC'), Buffer.from(saltB64, 'base64url'), expected.length, {
    N: Number(n),
    r: Number(r),
    p: Number(p),
    maxmem: MAXMEM,
  })
  return key.length === expected.length && timingSafeEqual(key, expected)
}

/** A hash of a random password, compared against when the e-mail is unknown so timing does not tell. */
let dummyHash: Promise<string> | undefined
export function getDummyHash(): Promise<string> {
  dummyHash ??= hashPassword(randomBytes(16).toString('hex'))
  return dummyHash
}
