import { onBeforeUnmount, onMounted } from 'vue'
import { useRouter } from 'vue-router'
import { Notify } from 'quasar'
import { emptyBurst, feedKey } from '../../labels/scan-burst'
import { extractCode } from '../../labels/qr-payload'
import { isApiError } from '../api/http'
import { useLabelsStore } from '../stores/labels'

/** Is the key going into a text field (where typing is normal) rather than to the page? */
function isTypingTarget(target: EventTarget | null): boolean {
  if (!(target instanceof HTMLElement)) return false
  if (target.closest('[data-scan-target]')) return false
  return target.isContentEditable || ['INPUT', 'TEXTAREA', 'SELECT'].includes(target.tagName)
}

/**
 * Keyboard-wedge scanners anywhere in the signed-in app: a fast burst of keys ending in Enter
 * (labels/scan-burst.ts) while no text field has focus (or in one marked `data-scan-target`)
 * opens the record. On the Scan page the scan goes to the scan session instead (move target,
 * "Move here"). Installed once by the header's scan button (ScanHeaderButton.vue).
 */
export function useScanner(): void {
  const router = useRouter()
  const labels = useLabelsStore()
  let state = emptyBurst()

  async function onScanned(text: string): Promise<void> {
    const code = extractCode(text)
    if (!code) return
    try {
      const hit = await labels.scan(code)
      if (router.currentRoute.value.name !== 'scan') await router.push(hit.to)
    } catch (err) {
      const message =
        isApiError(err) && err.status === 404
          ? `No record has the code ${code}`
          : err instanceof Error
            ? err.message
            : String(err)
      Notify.create({ type: 'negative', message, icon: 'mdi-qrcode-remove' })
    }
  }

  function onKeydown(e: KeyboardEvent): void {
    if (e.ctrlKey || e.altKey || e.metaKey || isTypingTarget(e.target)) {
      state = emptyBurst()
      return
    }
    const step = feedKey(state, e.key, e.timeStamp)
    state = step.state
    if (step.scanned) {
      e.preventDefault()
      void onScanned(step.scanned)
    }
  }

  onMounted(() => window.addEventListener('keydown', onKeydown, true))
  onBeforeUnmount(() => window.removeEventListener('keydown', onKeydown, true))
}
