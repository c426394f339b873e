import { describeRoleMatrix, EVERYONE, type MatrixRoute } from './role-matrix'

/**
 * The measurement routes and who may use them (shared/abilities.ts: optics staff, group leads and
 * safety officers describe laser setups, only safety officers sign them off (not the administrator
 * role alone), optics staff write sessions, fab technicians and optics staff upload files (and retire their own; group
 * leads any), admins
 * manage all, everyone signed in reads). Bodies are empty or point at missing ids, so allowed
 * calls answer 200/400/404 and write nothing.
 */
const MATRIX: MatrixRoute[] = [
  { method: 'get', path: '/api/laser-setups', allowed: EVERYONE },
  { method: 'get', path: '/api/laser-setups/999999999', allowed: EVERYONE },
  {
    method: 'post',
    path: '/api/laser-setups',
    body: {},
    allowed: ['admin', 'group_lead', 'optics_staff', 'safety_officer'],
  },
  {
    method: 'patch',
    path: '/api/laser-setups/999999999',
    body: {},
    allowed: ['admin', 'group_lead', 'optics_staff', 'safety_officer'],
  },
  {
    method: 'post',
    path: '/api/laser-setups/999999999/submit',
    body: {},
    allowed: ['admin', 'group_lead', 'optics_staff', 'safety_officer'],
  },
  { method: 'post', path: '/api/laser-setups/999999999/retire', body: {}, allowed: ['admin', 'safety_officer'] },
  { method: 'get', path: '/api/laser-setups/queue', allowed: ['safety_officer'] },
  { method: 'post', path: '/api/laser-setups/999999999/approve', body: {}, allowed: ['safety_officer'] },
  { method: 'post', path: '/api/laser-setups/999999999/reject', body: {}, allowed: ['safety_officer'] },
  { method: 'post', path: '/api/laser-setups/999999999/revoke', body: {}, allowed: ['safety_officer'] },
  { method: 'get', path: '/api/sessions', allowed: EVERYONE },
  { method: 'get', path: '/api/sessions/999999999', allowed: EVERYONE },
  { method: 'post', path: '/api/sessions/preview', body: {}, allowed: EVERYONE },
  { method: 'post', path: '/api/sessions', body: {}, allowed: ['admin', 'optics_staff'] },
  { method: 'patch', path: '/api/sessions/999999999', body: {}, allowed: ['admin', 'optics_staff'] },
  { method: 'get', path: '/api/files?entity=chip&entityId=999999999', allowed: EVERYONE },
  { method: 'get', path: '/api/files/999999999', allowed: EVERYONE },
  { method: 'get', path: '/api/files/999999999/download', allowed: EVERYONE },
  { method: 'get', path: '/api/files/999999999/preview', allowed: EVERYONE },
  { method: 'post', path: '/api/files', body: {}, allowed: ['admin', 'fab_technician', 'optics_staff'] },
  {
    method: 'post',
    path: '/api/files/999999999/retire',
    body: {},
    allowed: ['admin', 'group_lead', 'fab_technician', 'optics_staff'],
  },
]

describeRoleMatrix('measurement routes × roles', MATRIX, [200, 400, 404])
