import type { RouteRecordRaw } from 'vue-router'
import type { RouteName } from './routes'

export type Page = () => Promise<unknown>

/** One named page. `hasProps`: pass the path params to the page as props. */
export function route(
  name: RouteName,
  path: string,
  component: Page,
  meta: RouteRecordRaw['meta'] = {},
  hasProps = false,
): RouteRecordRaw {
  return { name, path, component, meta, props: hasProps } as RouteRecordRaw
}
