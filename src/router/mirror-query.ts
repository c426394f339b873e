import type { Router } from 'vue-router'

/**
 * Write `query` into the address bar for the page on show, so it can be linked and reloaded,
 * without a navigation: a replaced entry in the router's history, nothing more.
 *
 * A `router.replace` would be a navigation: guards, scroll behaviour and a new
 * `currentRoute.fullPath`, and Quasar closes every open popup (QSelect menus included) when
 * `fullPath` changes. A form mirrored that way lost the menu a person had just opened, and
 * the option they clicked in it, each time the URL caught up with an earlier edit.
 *
 * `router.currentRoute` keeps the query the page was opened with; the address bar and the
 * history entry (what reload, back and forward and a later navigation's "back" see) have the
 * mirrored one. Read the latest from `router.options.history.location`.
 */
export function mirrorQuery(router: Router, query: Record<string, string>): void {
  const { path, hash } = router.currentRoute.value
  const to = router.resolve({ path, query, hash }).fullPath
  if (to !== router.options.history.location) router.options.history.replace(to)
}
