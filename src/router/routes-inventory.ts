import type { RouteRecordRaw } from 'vue-router'
import { route } from './route'

/** Route names of this area (materials, locations, wafers, chips, arrays); part of the typed `RouteName` union.
 *  The lists live on the 'inventory' page (tabs: ?tab=wafers|chips|arrays|materials|locations). */
export type InventoryRouteName = 'material-detail' | 'location-detail' | 'wafer-detail' | 'chip-detail' | 'array-detail'

/** Detail pages; the paths are the ones the server's resolve and search answer with (/wafers/:id …). */
export const inventoryRoutes: RouteRecordRaw[] = [
  route(
    'material-detail',
    'materials/:id(\\d+)',
    () => import('../pages/MaterialDetailPage.vue'),
    { title: 'Material' },
    true,
  ),
  route(
    'location-detail',
    'locations/:id(\\d+)',
    () => import('../pages/LocationDetailPage.vue'),
    { title: 'Storage location' },
    true,
  ),
  route('wafer-detail', 'wafers/:id(\\d+)', () => import('../pages/WaferDetailPage.vue'), { title: 'Wafer' }, true),
  route('chip-detail', 'chips/:id(\\d+)', () => import('../pages/ChipDetailPage.vue'), { title: 'Chip' }, true),
  route('array-detail', 'arrays/:id(\\d+)', () => import('../pages/ArrayDetailPage.vue'), { title: 'Array' }, true),
]
