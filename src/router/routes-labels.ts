import type { RouteRecordRaw } from 'vue-router'

/** Route names of this area (labels, printing, scanning, /s/<code>); part of the typed `RouteName` union. */
export type LabelRouteName = never

/** Pages of this area, children of MainLayout (use `route()` from ./route with lazy imports). */
export const labelRoutes: RouteRecordRaw[] = []
