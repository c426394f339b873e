import type { RequestHandler, Request } from 'express'
import { defineAbilityFor, type Action, type Subject, type AppAbility } from '../../shared/abilities'
import { ForbiddenError, UnauthorizedError } from '../errors'
import type { User } from '../db/schema/index'

/** The signed-in person, or a 401. */
export function currentUser(req: Request): User {
  if (!req.user) throw new UnauthorizedError()
  return req.user as User
}

export function abilityOf(req: Request): AppAbility {
  return defineAbilityFor(req.user ? (req.user as User) : null)
}

/** 401 when nobody is signed in. */
export const requireUser: RequestHandler = (req, _res, next) => {
  next(req.user ? undefined : new UnauthorizedError())
}

/** 401 when nobody is signed in; 403 when the person's roles do not allow `action` on `subject`. */
export function requireAbility(action: Action, subject: Subject): RequestHandler {
  return (req, _res, next) => {
    if (!req.user) return next(new UnauthorizedError())
    if (!abilityOf(req).can(action, subject)) return next(new ForbiddenError())
    next()
  }
}
