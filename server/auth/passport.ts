import passport from 'passport'
import { Strategy as LocalStrategy } from 'passport-local'
import type { Db } from '../db/client'
import type { User } from '../db/schema/index'
import { findUserByEmail, findUserById } from '../services/people/users'
import { getDummyHash, verifyPassword } from './passwords'

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    // The signed-in person is the database row.
    // eslint-disable-next-line @typescript-eslint/no-empty-object-type -- declaration merging needs an interface
    interface User extends Omit<import('../db/schema/index').User, never> {}
  }
}

/** Configure passport: e-mail + password against scrypt hashes; the session holds only the user id,
 * and the person's row is read on every request (so a role change or deactivation counts at once). */
export function configurePassport(db: Db): passport.PassportStatic {
  const p = new passport.Passport() as unknown as passport.PassportStatic
  p.use(
    new LocalStrategy({ usernameField: 'email', passwordField: 'password' }, (email, password, done) => {
      void (async () => {
        const user = await findUserByEmail(db, email)
        // Compare against a dummy hash for unknown people so the answer takes the same time.
        const ok = await verifyPassword(password, user?.passwordHash ?? (await getDummyHash()))
        if (!user || !ok || !user.active || !user.passwordHash) return done(null, false)
        done(null, user)
      })().catch(done)
    }),
  )
  p.serializeUser((user, done) => done(null, (user as User).id))
  p.deserializeUser((id: number, done) => {
    findUserById(db, Number(id))
      .then((u) => done(null, u && u.active ? u : false))
      .catch(done)
  })
  return p
}
