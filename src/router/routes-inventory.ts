import type { RouteRecordRaw } from 'vue-router'

/** Route names of this area (materials, locations, wafers, chips, arrays); part of the typed `RouteName` union. */
export type InventoryRouteName = never

/** Pages of this area, children of MainLayout (use `route()` from ./route with lazy imports). */
export const inventoryRoutes: RouteRecordRaw[] = []
