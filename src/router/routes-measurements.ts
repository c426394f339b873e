import type { RouteRecordRaw } from 'vue-router'
import { route } from './route'

/** Route names of this area (laser setups, measurement sessions, files); part of the typed `RouteName` union. */
export type MeasurementRouteName = 'session-new' | 'session-detail' | 'laser-setups' | 'laser-setup-detail'

/**
 * Pages of this area, children of MainLayout. The list itself is the core route 'measurements'.
 * Paths /sessions/:id and /laser-setups/:id are the ones the server's search and code resolver link to.
 */
export const measurementRoutes: RouteRecordRaw[] = [
  route('session-new', 'measurements/new', () => import('../pages/SessionNewPage.vue'), { title: 'Log a session', requires: ['create', 'Session'] }),
  route('session-detail', 'sessions/:id(\\d+)', () => import('../pages/SessionDetailPage.vue'), { title: 'Measurement session' }, true),
  route('laser-setups', 'laser-setups', () => import('../pages/LaserSetupsPage.vue'), { title: 'Laser setups' }),
  route('laser-setup-detail', 'laser-setups/:id(\\d+)', () => import('../pages/LaserSetupDetailPage.vue'), { title: 'Laser setup' }, true),
]
