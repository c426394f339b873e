import type { RouteRecordRaw } from 'vue-router'
import { route } from './route'
import type { Action, Subject } from '../../shared/abilities'
import { inventoryRoutes, type InventoryRouteName } from './routes-inventory'
import { measurementRoutes, type MeasurementRouteName } from './routes-measurements'
import { labelRoutes, type LabelRouteName } from './routes-labels'
import { adminRoutes, type AdminRouteName } from './routes-admin'

/** Every route's name. Links (`AppLink`) and pushes (`pushTo`) accept only these. */
export type RouteName = CoreRouteName | InventoryRouteName | MeasurementRouteName | LabelRouteName | AdminRouteName

type CoreRouteName =
  | 'sign-in'
  | 'sign-out'
  | 'accept-invite'
  | 'home'
  | 'account'
  | 'inventory'
  | 'fabrication'
  | 'measurements'
  | 'laser-safety'
  | 'labels'
  | 'channels'
  | 'people'
  | 'mail-outbox'
  | 'mail-message'
  | 'not-allowed'
  | 'not-found'

declare module 'vue-router' {
  interface RouteMeta {
    /** Shown in the browser tab after "Overtone · ". */
    title?: string
    /** Open without signing in. */
    isPublic?: boolean
    /** What a person must be allowed to do to open the page (checked with CASL). */
    requires?: [Action, Subject]
  }
}

// Route pages are lazy so the first page stays small; each area becomes its own chunk.
// Both layouts hang off '/'. MainLayout must come first: on equal rank vue-router keeps insertion
// order, and its '' child (home) has to win '/' over the bare parent matched on its own.
export const routes: RouteRecordRaw[] = [
  {
    path: '/',
    component: () => import('../layouts/MainLayout.vue'),
    children: [
      route('home', '', () => import('../pages/HomePage.vue'), { title: 'Overview' }),
      route('account', 'account', () => import('../pages/AccountPage.vue'), { title: 'My account' }),
      route('inventory', 'inventory', () => import('../pages/InventoryPage.vue'), { title: 'Sample store' }),
      route('fabrication', 'fabrication', () => import('../pages/FabricationPage.vue'), { title: 'Cleanroom work' }),
      route('measurements', 'measurements', () => import('../pages/MeasurementsPage.vue'), {
        title: 'Optical measurements',
      }),
      route('laser-safety', 'laser-safety', () => import('../pages/LaserSafetyPage.vue'), { title: 'Laser safety' }),
      route('labels', 'labels', () => import('../pages/LabelsPage.vue'), { title: 'Labels & scanning' }),
      route('channels', 'channels', () => import('../pages/ChannelsPage.vue'), { title: 'Harmonic channels' }),
      route('people', 'people', () => import('../pages/PeoplePage.vue'), {
        title: 'People',
        requires: ['read', 'User'],
      }),
      route('mail-outbox', 'mail', () => import('../pages/MailOutboxPage.vue'), {
        title: 'Mail outbox',
        requires: ['read', 'Mail'],
      }),
      route(
        'mail-message',
        'mail/:id(\\d+)',
        () => import('../pages/MailMessagePage.vue'),
        { title: 'Mail message', requires: ['read', 'Mail'] },
        true,
      ),
      ...inventoryRoutes,
      ...measurementRoutes,
      ...labelRoutes,
      ...adminRoutes,
      route('not-allowed', 'not-allowed', () => import('../pages/NotAllowedPage.vue'), { title: 'Not allowed' }),
      route('not-found', ':pathMatch(.*)*', () => import('../pages/NotFoundPage.vue'), { title: 'Not found' }),
    ],
  },
  {
    path: '/',
    component: () => import('../layouts/BareLayout.vue'),
    children: [
      route('sign-in', 'sign-in', () => import('../pages/SignInPage.vue'), { title: 'Sign in', isPublic: true }),
      route('sign-out', 'sign-out', () => import('../pages/SignOutPage.vue'), { title: 'Signed out', isPublic: true }),
      route(
        'accept-invite',
        'invite/:token',
        () => import('../pages/AcceptInvitePage.vue'),
        { title: 'Accept invitation', isPublic: true },
        true,
      ),
    ],
  },
]
