import { computed } from 'vue'
import { useQuasar } from 'quasar'

const STORAGE_KEY = 'overtone.dark'

/** The stored choice, read before the app mounts so the first paint is already right. */
export function readStoredDarkMode(): boolean {
  try {
    return localStorage.getItem(STORAGE_KEY) === 'true'
  } catch {
    return false
  }
}

/** Light/dark switch, remembered on this device (lab tablets are shared, so not per person). */
export function useDarkMode() {
  const $q = useQuasar()
  const isDark = computed(() => $q.dark.isActive)
  function toggle(): void {
    $q.dark.set(!$q.dark.isActive)
    try {
      localStorage.setItem(STORAGE_KEY, String($q.dark.isActive))
    } catch {
      // Storage can be disabled (private mode); the switch still works for this visit.
    }
  }
  return { isDark, toggle }
}
