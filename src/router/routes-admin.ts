import type { RouteRecordRaw } from 'vue-router'

/** Route names of the admin and group-lead pages (audit search, Excel export and import). */
export type AdminRouteName = never

/** Pages of this area, children of MainLayout (use `route()` from ./route with lazy imports). */
export const adminRoutes: RouteRecordRaw[] = []
