/** Errors a service may throw; the error middleware maps each to its HTTP status. */
export class AppError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly fields?: Record<string, string[]>,
  ) {
    super(message)
  }
}
export class BadRequestError extends AppError {
  constructor(message: string, fields?: Record<string, string[]>) {
    super(400, 'bad_request', message, fields)
  }
}
export class UnauthorizedError extends AppError {
  constructor(message = 'Please sign in.') {
    super(401, 'unauthorized', message)
  }
}
export class ForbiddenError extends AppError {
  constructor(message = 'You are not allowed to do this.') {
    super(403, 'forbidden', message)
  }
}
export class NotFoundError extends AppError {
  constructor(message = 'Not found.') {
    super(404, 'not_found', message)
  }
}
export class ConflictError extends AppError {
  constructor(message: string, fields?: Record<string, string[]>) {
    super(409, 'conflict', message, fields)
  }
}
/** A field-level 400 for one field. */
export function fieldError(field: string, message: string): BadRequestError {
  return new BadRequestError(message, { [field]: [message] })
}
