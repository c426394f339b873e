import type { RouteRecordRaw } from 'vue-router'
import { route } from './route'

/** Route names of this area (laser setups, measurement sessions, files); part of the typed `RouteName` union. */
export type MeasurementRouteName =
  | 'session-new'
  | 'session-detail'
  | 'laser-setups'
  | 'laser-setup-detail'
  | 'session-analysis'
  | 'array-patterns'
  | 'crystal-patterns'
  | 'array-sheet'
  | 'chip-sheet'

/**
 * Pages of this area, children of MainLayout. The list itself is the core route 'measurements'.
 * Paths /sessions/:id and /laser-setups/:id are the ones the server's search and code resolver link to.
 */
export const measurementRoutes: RouteRecordRaw[] = [
  route('session-new', 'measurements/new', () => import('../pages/SessionNewPage.vue'), {
    title: 'Log a session',
    requires: ['create', 'Session'],
  }),
  route(
    'session-detail',
    'sessions/:id(\\d+)',
    () => import('../pages/SessionDetailPage.vue'),
    { title: 'Measurement session' },
    true,
  ),
  route('laser-setups', 'laser-setups', () => import('../pages/LaserSetupsPage.vue'), { title: 'Laser setups' }),
  route(
    'laser-setup-detail',
    'laser-setups/:id(\\d+)',
    () => import('../pages/LaserSetupDetailPage.vue'),
    { title: 'Laser setup' },
    true,
  ),
  // measurement analysis (issue 6): fits and spectra of a session, predicted polar patterns, printable sample sheets
  route(
    'session-analysis',
    'sessions/:id(\\d+)/analysis',
    () => import('../pages/SessionAnalysisPage.vue'),
    { title: 'Analyse session data' },
    true,
  ),
  route(
    'array-patterns',
    'arrays/:id(\\d+)/patterns',
    () => import('../pages/ArrayPatternsPage.vue'),
    { title: 'Polar patterns' },
    true,
  ),
  route('crystal-patterns', 'channels/patterns', () => import('../pages/CrystalPatternsPage.vue'), {
    title: 'Polar patterns of a crystal',
  }),
  route(
    'array-sheet',
    'arrays/:id(\\d+)/sheet',
    () => import('../pages/SampleSheetPage.vue'),
    { title: 'Sample sheet' },
    true,
  ),
  route(
    'chip-sheet',
    'chips/:id(\\d+)/sheet',
    () => import('../pages/SampleSheetPage.vue'),
    { title: 'Sample sheet' },
    true,
  ),
]
