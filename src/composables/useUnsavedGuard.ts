import { computed, onBeforeUnmount, onMounted, ref } from 'vue'
import { onBeforeRouteLeave } from 'vue-router'
import { askConfirm } from './askConfirm'

export interface UnsavedGuardOptions {
  /** Guard only while this holds (a dialog: while it is open). */
  when?: () => boolean
  /** What the question says; default: the typed input would be lost. */
  message?: string
  /** The question (tests replace it); resolves true to leave. */
  ask?: (message: string) => Promise<boolean>
}

const DEFAULT_MESSAGE = 'What you typed in this form has not been saved. Leave and lose it?'

/**
 * Keep typed input from being lost: while the form differs from its last clean state, leaving the
 * page in the app (a link, the browser's Back) asks first, and closing or reloading the tab shows
 * the browser's own "leave site?" question (`beforeunload`). `state` is what the form holds (read
 * as JSON); call `markClean()` after filling the form and after saving, before navigating away.
 */
export function useUnsavedGuard(state: () => unknown, options: UnsavedGuardOptions = {}) {
  const snapshot = () => JSON.stringify(state() ?? null)
  const clean = ref(snapshot())
  const isDirty = computed(() => (options.when?.() ?? true) && snapshot() !== clean.value)

  function markClean(): void {
    clean.value = snapshot()
  }

  const ask =
    options.ask ??
    ((message: string) =>
      askConfirm({ title: 'Leave without saving?', message, ok: 'Leave', cancel: 'Stay', color: 'negative' }))
  onBeforeRouteLeave(async () => (isDirty.value ? ask(options.message ?? DEFAULT_MESSAGE) : true))

  function onBeforeUnload(e: BeforeUnloadEvent): void {
    if (!isDirty.value) return
    e.preventDefault()
    // Older browsers show their question only when returnValue is set.
    e.returnValue = ''
  }
  onMounted(() => window.addEventListener('beforeunload', onBeforeUnload))
  onBeforeUnmount(() => window.removeEventListener('beforeunload', onBeforeUnload))

  return { isDirty, markClean }
}
