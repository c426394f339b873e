import { Router } from 'express'
import type passport from 'passport'
import { rateLimit, ipKeyGenerator } from 'express-rate-limit'
import { loginSchema, changePasswordSchema, acceptInviteSchema } from '../../shared/schemas/auth'
import type { AppContext } from '../context'
import { parse } from '../middleware/validate'
import { currentUser, requireUser } from '../auth/guards'
import { acceptInvitation, changePassword, describeInvitation, toPublicUser } from '../services/people/users'
import { UnauthorizedError, AppError } from '../errors'
import type { User } from '../db/schema/index'
import { preferencesSchema } from '../../shared/schemas/notices'
import { getPreferences, setPreferences } from '../services/mail/notices'
import { MariaDbThrottleStore } from '../services/people/throttle-store'

/** How long an account stays throttled after too many failed sign-ins from anywhere. */
export const ACCOUNT_WINDOW_MIN = 5

export function authRoutes(ctx: AppContext, pp: passport.PassportStatic): Router {
  const r = Router()

  // Failed sign-ins per address and e-mail in a 10-minute window; successful ones do not count.
  // Counted in MariaDB, so every app server behind a proxy sees the same count.
  const loginLimiter = rateLimit({
    store: new MariaDbThrottleStore(ctx.db, 'login'),
    windowMs: 10 * 60 * 1000,
    limit: ctx.env.LOGIN_MAX_FAILURES,
    skipSuccessfulRequests: true,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    keyGenerator: (req) =>
      `${ipKeyGenerator(req.ip ?? '')}|${String(req.body?.email ?? '')
        .toLowerCase()
        .slice(0, 190)}`,
    handler: (_req, _res, next) =>
      next(new AppError(429, 'too_many_attempts', 'Too many failed sign-ins. Wait ten minutes and try again.')),
  })

  // Failed sign-ins per account from any address (guesses spread over many addresses): twice the
  // per-address limit in a 5-minute window, so the real person waits at most five minutes.
  const accountLimiter = rateLimit({
    store: new MariaDbThrottleStore(ctx.db, 'login-account'),
    windowMs: ACCOUNT_WINDOW_MIN * 60 * 1000,
    limit: 2 * ctx.env.LOGIN_MAX_FAILURES,
    skipSuccessfulRequests: true,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    keyGenerator: (req) =>
      String(req.body?.email ?? '')
        .toLowerCase()
        .slice(0, 190),
    handler: (_req, _res, next) =>
      next(
        new AppError(
          429,
          'too_many_attempts',
          `Too many failed sign-ins for this account. Wait ${ACCOUNT_WINDOW_MIN} minutes and try again; if it was not you, tell your administrator.`,
        ),
      ),
  })

  r.post('/login', loginLimiter, accountLimiter, (req, res, next) => {
    req.body = parse(loginSchema, req.body)
    pp.authenticate('local', (err: unknown, user: User | false) => {
      if (err) return next(err)
      if (!user) return next(new UnauthorizedError('E-mail or password is not right, or the account is not active.'))
      // passport 0.7 regenerates the session id here (no session fixation).
      req.login(user, (e) => (e ? next(e) : res.json({ user: toPublicUser(user) })))
    })(req, res, next)
  })

  r.post('/logout', (req, res, next) => {
    req.logout((err) => {
      if (err) return next(err)
      req.session.destroy(() => {
        res.clearCookie('sid')
        res.status(204).end()
      })
    })
  })

  r.get('/me', requireUser, (req, res) => {
    res.json({ user: toPublicUser(currentUser(req)) })
  })

  r.post('/password', requireUser, async (req, res) => {
    const input = parse(changePasswordSchema, req.body)
    await changePassword(ctx.db, currentUser(req), input.currentPassword, input.newPassword, req.sessionID)
    res.status(204).end()
  })

  r.get('/preferences', requireUser, async (req, res) => {
    res.json(await getPreferences(ctx.db, currentUser(req).id))
  })

  r.patch('/preferences', requireUser, async (req, res) => {
    res.json(await setPreferences(ctx.db, currentUser(req).id, parse(preferencesSchema, req.body)))
  })

  r.get('/invite/:token', async (req, res) => {
    res.json(await describeInvitation(ctx.db, String(req.params.token).slice(0, 200)))
  })

  r.post('/accept-invite', async (req, res, next) => {
    const input = parse(acceptInviteSchema, req.body)
    const user = await acceptInvitation(ctx.db, input.token, input.password)
    req.login(user, (e) => (e ? next(e) : res.json({ user: toPublicUser(user) })))
  })

  return r
}
