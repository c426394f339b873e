import type { Role } from '../../../shared/roles'

/** The invented demo lab's people. All demo sign-ins share one password, printed by `npm start`. */
export const DEMO_PASSWORD = 'overtone-demo'
export const DEMO_PEOPLE: { email: string; name: string; roles: Role[] }[] = [
  { email: 'admin@kestrel-lab.example', name: 'Ada Ferreira-Lund', roles: ['admin'] },
  { email: 'lead@kestrel-lab.example', name: 'Maren Okafor', roles: ['group_lead'] },
  { email: 'fab@kestrel-lab.example', name: 'Tomasz Lindqvist', roles: ['fab_technician'] },
  { email: 'optics@kestrel-lab.example', name: 'Priya Halvorsen', roles: ['optics_staff'] },
  { email: 'safety@kestrel-lab.example', name: 'Jonas Abara', roles: ['safety_officer'] },
]
