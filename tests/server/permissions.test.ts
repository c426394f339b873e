import { describeRoleMatrix, EVERYONE, type MatrixRoute } from './role-matrix'

/**
 * Every protected route and the roles that may use it (the product brief: admins and group leads
 * manage people; only admins read the mail outbox; every signed-in person searches and computes).
 * The bodies are deliberately empty or invalid, so an allowed call answers 2xx/400/404 and writes nothing.
 */
const MATRIX: MatrixRoute[] = [
  { method: 'get', path: '/api/users', allowed: ['admin', 'group_lead'] },
  { method: 'post', path: '/api/users/invite', body: {}, allowed: ['admin', 'group_lead'] },
  { method: 'patch', path: '/api/users/999999', body: { name: 'Nobody Here' }, allowed: ['admin', 'group_lead'] },
  { method: 'get', path: '/api/mail', allowed: ['admin'] },
  { method: 'get', path: '/api/mail/queue', allowed: ['admin'] },
  { method: 'get', path: '/api/mail/999999', allowed: ['admin'] },
  { method: 'get', path: '/api/search?q=lab', allowed: EVERYONE },
  { method: 'post', path: '/api/channels', body: {}, allowed: EVERYONE },
  { method: 'post', path: '/api/polar', body: {}, allowed: EVERYONE },
  { method: 'get', path: '/api/auth/me', allowed: EVERYONE },
  { method: 'post', path: '/api/auth/password', body: {}, allowed: EVERYONE },
]

describeRoleMatrix('route × role matrix', MATRIX)
