import type { ApiErrorBody } from '../../shared/types'

/** A non-2xx answer from the API, with the server's message and per-field messages. */
export class ApiError extends Error {
  readonly status: number
  readonly code: string
  /** Field path → messages, from a 400 answer (e.g. `{ email: ['Enter a valid e-mail address'] }`). */
  readonly fieldErrors: Record<string, string[]>
  readonly requestId?: string

  constructor(status: number, body: Partial<ApiErrorBody>) {
    super(body.message || `The server answered ${status}`)
    this.name = 'ApiError'
    this.status = status
    this.code = body.error ?? 'error'
    this.fieldErrors = body.fields ?? {}
    this.requestId = body.requestId
  }
}

export function isApiError(err: unknown): err is ApiError {
  return err instanceof ApiError
}

/** Paths whose 401 is an ordinary answer (not signed in / wrong password), not an expired session. */
const QUIET_401_PATHS = ['/auth/me', '/auth/login']

let onUnauthorized: (() => void) | null = null

/** The router registers the one place that sends a person to sign in when the session is gone. */
export function setUnauthorizedHandler(handler: () => void): void {
  onUnauthorized = handler
}

type Method = 'GET' | 'POST' | 'PATCH' | 'PUT' | 'DELETE'

async function request<T>(method: Method, path: string, body?: unknown): Promise<T> {
  let res: Response
  try {
    res = await fetch(`/api${path}`, {
      method,
      credentials: 'same-origin',
      headers:
        body === undefined
          ? { Accept: 'application/json' }
          : { Accept: 'application/json', 'Content-Type': 'application/json' },
      body: body === undefined ? undefined : JSON.stringify(body),
    })
  } catch {
    throw new ApiError(0, {
      error: 'network',
      message: 'The Overtone server cannot be reached. Check the network and try again.',
    })
  }
  if (res.status === 204) return undefined as T
  const data: unknown = await res.json().catch(() => ({}))
  if (!res.ok) {
    if (res.status === 401 && !QUIET_401_PATHS.includes(path)) onUnauthorized?.()
    throw new ApiError(res.status, (data ?? {}) as Partial<ApiErrorBody>)
  }
  return data as T
}

export const http = {
  get: <T>(path: string) => request<T>('GET', path),
  post: <T>(path: string, body?: unknown) => request<T>('POST', path, body ?? {}),
  patch: <T>(path: string, body: unknown) => request<T>('PATCH', path, body),
}
