import { createRouter, createWebHistory, type RouteLocationRaw } from 'vue-router'
import { setUnauthorizedHandler } from '../api/http'
import { useAuthStore } from '../stores/auth'
import { routes, type RouteName } from './routes'

export const router = createRouter({
  history: createWebHistory(),
  routes,
  // Back/forward restore the position; a change of query only (a tab, a filter) keeps it; a new page starts at the top.
  scrollBehavior: (to, from, saved) => saved ?? (to.path === from.path ? false : { top: 0 }),
})

/** A route location that can only be built from a known route name. */
export interface NamedLocation {
  name: RouteName
  params?: Record<string, string | number>
  query?: Record<string, string>
}

export function pushTo(to: NamedLocation) {
  return router.push(to as RouteLocationRaw)
}

router.beforeEach(async (to) => {
  const auth = useAuthStore()
  if (!auth.isChecked) await auth.fetchMe().catch(() => null)

  if (to.meta.isPublic) {
    if (to.name === 'sign-in' && auth.isSignedIn) return { name: 'home' }
    return true
  }
  if (!auth.isSignedIn) {
    return { name: 'sign-in', query: to.fullPath === '/' ? {} : { redirect: to.fullPath } }
  }
  const requires = to.meta.requires
  if (requires && !auth.ability.can(...requires)) {
    return { name: 'not-allowed', query: { from: to.fullPath } }
  }
  return true
})

router.afterEach((to) => {
  document.title = to.meta.title ? `${to.meta.title} · Overtone` : 'Overtone'
})

// The one place where an expired session (401 from any API call but /auth/me and /auth/login)
// sends the person back to sign in, and then back to where they were: the history's location,
// which also has a query a page mirrored there (mirrorQuery) after it was opened.
setUnauthorizedHandler(() => {
  useAuthStore().setUser(null)
  const current = router.currentRoute.value
  if (current.meta.isPublic) return
  void router.push({ name: 'sign-in', query: { redirect: router.options.history.location } })
})
