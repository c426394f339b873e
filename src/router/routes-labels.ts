import type { RouteRecordRaw } from 'vue-router'
import { route } from './route'

/** Route names of this area (labels, printing, scanning, /s/<code>); part of the typed `RouteName` union. */
export type LabelRouteName = 'label-print' | 'scan' | 'scan-resolve'

/** Pages of this area, children of MainLayout (use `route()` from ./route with lazy imports). */
export const labelRoutes: RouteRecordRaw[] = [
  route('label-print', 'labels/print', () => import('../pages/LabelPrintPage.vue'), { title: 'Print labels' }),
  route('scan', 'scan', () => import('../pages/ScanPage.vue'), { title: 'Scan a label' }),
  // What a label's QR opens: <PUBLIC_URL>/S/<CODE> (upper case, QR alphanumeric mode). vue-router
  // matches paths case-insensitively unless `sensitive` is set, so this one route answers both
  // /s/<code> and /S/<code>; the server's SPA fallback serves index.html for either.
  {
    ...route(
      'scan-resolve',
      's/:code',
      () => import('../pages/ScanResolvePage.vue'),
      { title: 'Opening a label' },
      true,
    ),
    sensitive: false,
  },
]
