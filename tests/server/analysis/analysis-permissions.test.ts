import { describeRoleMatrix, EVERYONE, type MatrixRoute } from '../role-matrix'

/**
 * The analysis routes × roles: reading for everyone signed in; fits and spectra (which may save) for optics staff and
 * admins.
 */
const MATRIX: MatrixRoute[] = [
  { method: 'get', path: '/api/analysis/arrays/999999999/pattern', allowed: EVERYONE },
  { method: 'get', path: '/api/analysis/chips/999999999/pattern', allowed: EVERYONE },
  { method: 'post', path: '/api/analysis/pattern', body: {}, allowed: EVERYONE },
  { method: 'get', path: '/api/analysis/arrays/999999999/sheet', allowed: EVERYONE },
  { method: 'get', path: '/api/analysis/chips/999999999/sheet', allowed: EVERYONE },
  { method: 'get', path: '/api/analysis/sessions/999999999', allowed: EVERYONE },
  { method: 'post', path: '/api/analysis/sessions/999999999/fit', body: {}, allowed: ['admin', 'optics_staff'] },
  { method: 'post', path: '/api/analysis/sessions/999999999/spectrum', body: {}, allowed: ['admin', 'optics_staff'] },
]

describeRoleMatrix('analysis routes × roles', MATRIX, [200, 400, 404])
