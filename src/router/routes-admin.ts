import type { RouteRecordRaw } from 'vue-router'
import { route } from './route'

/** Route names of the admin and group-lead pages (audit search, Excel export and import). */
export type AdminRouteName = 'audit-search' | 'excel'

/** Pages of this area, children of MainLayout (use `route()` from ./route with lazy imports). */
export const adminRoutes: RouteRecordRaw[] = [
  route('audit-search', 'audit', () => import('../pages/AuditSearchPage.vue'), {
    title: 'Audit trail',
    requires: ['read', 'Audit'],
  }),
  route('excel', 'excel', () => import('../pages/InventoryExcelPage.vue'), {
    title: 'Export & import',
    requires: ['export', 'Inventory'],
  }),
]
