// @vitest-environment happy-dom
import { describe, it, expect, vi, afterEach } from 'vitest'
import { defineComponent, h, nextTick, reactive } from 'vue'
import { mount, flushPromises, type VueWrapper } from '@vue/test-utils'
import { createMemoryHistory, createRouter, RouterView } from 'vue-router'
import { useUnsavedGuard } from '../../../src/composables/useUnsavedGuard'

/** A page with one typed field, guarded; `answer` is what the person says to "Leave without saving?". */
function setup(answer: boolean) {
  const ask = vi.fn(async () => answer)
  const form = reactive({ name: '' })
  let guard!: ReturnType<typeof useUnsavedGuard>
  const Page = defineComponent({
    setup() {
      guard = useUnsavedGuard(() => form, { ask })
      return () => h('div', 'form')
    },
  })
  const Other = defineComponent({ render: () => h('div', 'other') })
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/form', component: Page },
      { path: '/other', component: Other },
    ],
  })
  return { ask, form, router, guard: () => guard, Page }
}
let wrapper: VueWrapper | undefined
afterEach(() => {
  wrapper?.unmount()
  wrapper = undefined
})
async function open(s: ReturnType<typeof setup>) {
  await s.router.push('/form')
  wrapper = mount(defineComponent({ render: () => h(RouterView) }), { global: { plugins: [s.router] } })
  await s.router.isReady()
  await flushPromises()
}
const beforeUnload = () => {
  const e = new Event('beforeunload', { cancelable: true })
  window.dispatchEvent(e)
  return e.defaultPrevented
}

describe('useUnsavedGuard', () => {
  it('leaves without asking while nothing was typed', async () => {
    const s = setup(false)
    await open(s)
    expect(beforeUnload()).toBe(false)
    await s.router.push('/other')
    expect(s.ask).not.toHaveBeenCalled()
    expect(s.router.currentRoute.value.path).toBe('/other')
  })

  it('asks before leaving with typed input, and stays on "Stay"; the tab close is held too', async () => {
    const s = setup(false)
    await open(s)
    s.form.name = 'half-typed'
    await nextTick()
    expect(s.guard().isDirty.value).toBe(true)
    expect(beforeUnload()).toBe(true)
    await s.router.push('/other')
    expect(s.ask).toHaveBeenCalledOnce()
    expect(s.router.currentRoute.value.path).toBe('/form')
  })

  it('leaves on "Leave", and after markClean (saved) without asking', async () => {
    const s = setup(true)
    await open(s)
    s.form.name = 'typed'
    await s.router.push('/other')
    expect(s.router.currentRoute.value.path).toBe('/other')

    const t = setup(true)
    await open(t)
    t.form.name = 'saved'
    t.guard().markClean()
    expect(beforeUnload()).toBe(false)
    await t.router.push('/other')
    expect(t.ask).not.toHaveBeenCalled()
  })
})
