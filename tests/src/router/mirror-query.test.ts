import { describe, it, expect, vi } from 'vitest'
import { nextTick, watch } from 'vue'
import { createMemoryHistory, createRouter, type Router } from 'vue-router'
import { mirrorQuery } from '../../../src/router/mirror-query'

const Blank = { render: () => null }

async function openChannels(): Promise<Router> {
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/', name: 'home', component: Blank },
      { path: '/channels', name: 'channels', component: Blank },
      { path: '/patterns', name: 'patterns', component: Blank },
    ],
  })
  await router.push('/')
  await router.push('/channels')
  return router
}

/** Let a navigation, if one was started, run to its end. */
const settle = async () => {
  for (let i = 0; i < 5; i++) {
    await nextTick()
    await new Promise((r) => setTimeout(r, 0))
  }
}

const cut111 = { pg: '-43m', n: '(111)', ref: '[1-10]', shape: 'disk' }
const triangle = { ...cut111, shape: 'triangle' }

describe('mirrorQuery (a form mirrored into the URL)', () => {
  it('writes the query into the current history entry', async () => {
    const router = await openChannels()
    mirrorQuery(router, cut111)
    expect(router.options.history.location).toBe(router.resolve({ path: '/channels', query: cut111 }).fullPath)
    expect(router.options.history.location).toContain('shape=disk')
  })

  it('is not a navigation: no guards, and what watches the route (Quasar closes its open menus on it) sees no change', async () => {
    const router = await openChannels()
    const guards = vi.fn()
    router.beforeEach(() => {
      guards()
    })
    const routeChanged = vi.fn()
    watch(() => router.currentRoute.value.fullPath, routeChanged, { flush: 'sync' })

    // The cut is mirrored 300 ms after its chip was clicked, while the shape menu is open; the person's
    // pick of the shape then goes through the same path.
    mirrorQuery(router, cut111)
    await settle()
    mirrorQuery(router, triangle)
    await settle()

    expect(guards).not.toHaveBeenCalled()
    expect(routeChanged).not.toHaveBeenCalled()
    expect(router.options.history.location).toContain('shape=triangle')
  })

  it('replaces the entry rather than adding one: back leaves the page', async () => {
    const router = await openChannels()
    mirrorQuery(router, cut111)
    mirrorQuery(router, triangle)
    router.back()
    await settle()
    expect(router.currentRoute.value.name).toBe('home')
  })

  it('a later navigation keeps the mirrored query in the entry it leaves, so back restores the latest request', async () => {
    const router = await openChannels()
    mirrorQuery(router, cut111)
    mirrorQuery(router, triangle)
    await router.push('/patterns')
    router.back()
    await settle()
    expect(router.currentRoute.value.name).toBe('channels')
    expect(router.currentRoute.value.query).toEqual(triangle)
  })

  it('leaves the history alone when the query is already there', async () => {
    const router = await openChannels()
    mirrorQuery(router, triangle)
    const replace = vi.spyOn(router.options.history, 'replace')
    mirrorQuery(router, triangle)
    expect(replace).not.toHaveBeenCalled()
  })
})
