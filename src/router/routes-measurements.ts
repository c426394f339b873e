import type { RouteRecordRaw } from 'vue-router'

/** Route names of this area (laser setups, measurement sessions, files); part of the typed `RouteName` union. */
export type MeasurementRouteName = never

/** Pages of this area, children of MainLayout (use `route()` from ./route with lazy imports). */
export const measurementRoutes: RouteRecordRaw[] = []
