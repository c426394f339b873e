import { describeRoleMatrix, EVERYONE, type MatrixRoute } from './role-matrix'
import type { Role } from '../../shared/roles'

const FAB: Role[] = ['admin', 'fab_technician']
/**
 * The inventory routes × roles (shared/abilities.ts: every signed-in person reads lab records;
 * fab technicians and admins write materials, locations, wafers, chips, fab steps and arrays).
 * Bodies are empty or point at missing ids, so an allowed call answers 2xx/400/404 and writes nothing.
 */
const MATRIX: MatrixRoute[] = [
  { method: 'get', path: '/api/materials', allowed: EVERYONE },
  { method: 'get', path: '/api/materials/999999', allowed: EVERYONE },
  { method: 'post', path: '/api/materials', body: {}, allowed: FAB },
  { method: 'patch', path: '/api/materials/999999', body: {}, allowed: FAB },
  { method: 'post', path: '/api/materials/999999/retire', body: { reason: 'x' }, allowed: FAB },
  { method: 'get', path: '/api/locations', allowed: EVERYONE },
  { method: 'get', path: '/api/locations/999999', allowed: EVERYONE },
  { method: 'post', path: '/api/locations', body: {}, allowed: FAB },
  { method: 'patch', path: '/api/locations/999999', body: {}, allowed: FAB },
  { method: 'post', path: '/api/locations/999999/retire', body: { reason: 'x' }, allowed: FAB },
  { method: 'get', path: '/api/moves?itemCode=W-0001', allowed: EVERYONE },
  { method: 'post', path: '/api/moves', body: {}, allowed: FAB },
  { method: 'get', path: '/api/wafers', allowed: EVERYONE },
  { method: 'get', path: '/api/wafers/999999', allowed: EVERYONE },
  { method: 'post', path: '/api/wafers', body: {}, allowed: FAB },
  { method: 'patch', path: '/api/wafers/999999', body: {}, allowed: FAB },
  { method: 'post', path: '/api/wafers/999999/retire', body: { reason: 'x' }, allowed: FAB },
  { method: 'post', path: '/api/wafers/999999/dice', body: {}, allowed: FAB },
  { method: 'get', path: '/api/chips', allowed: EVERYONE },
  { method: 'get', path: '/api/chips/999999', allowed: EVERYONE },
  { method: 'patch', path: '/api/chips/999999', body: { notes: 'x' }, allowed: FAB },
  { method: 'post', path: '/api/chips/999999/retire', body: { reason: 'x' }, allowed: FAB },
  { method: 'get', path: '/api/chips/999999/fab-steps', allowed: EVERYONE },
  { method: 'post', path: '/api/chips/999999/fab-steps', body: {}, allowed: FAB },
  { method: 'get', path: '/api/chips/999999/arrays', allowed: EVERYONE },
  { method: 'post', path: '/api/chips/999999/arrays', body: {}, allowed: FAB },
  { method: 'get', path: '/api/arrays', allowed: EVERYONE },
  { method: 'get', path: '/api/arrays/999999', allowed: EVERYONE },
  { method: 'post', path: '/api/arrays', body: {}, allowed: FAB },
  { method: 'patch', path: '/api/arrays/999999', body: {}, allowed: FAB },
  { method: 'post', path: '/api/arrays/999999/retire', body: { reason: 'x' }, allowed: FAB },
  { method: 'post', path: '/api/arrays/999999/recompute', allowed: FAB },
  { method: 'post', path: '/api/arrays/recompute', body: { ids: [999999] }, allowed: FAB },
  { method: 'get', path: '/api/resolve/W-99999', allowed: EVERYONE },
]

describeRoleMatrix('inventory route × role matrix', MATRIX)
