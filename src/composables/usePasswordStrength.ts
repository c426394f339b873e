import { ref, watch, onScopeDispose, type Ref } from 'vue'

/**
 * The estimator's feedback on a password while it is typed (the server applies the same rule on
 * save). The estimator and its dictionaries load as their own chunk on the first keystroke.
 */
export function usePasswordStrength(password: Ref<string>, userInputs: () => string[]) {
  const feedback = ref<string[]>([])
  const isStrong = ref(false)
  let timer: ReturnType<typeof setTimeout> | undefined
  let asked = 0
  watch(password, (pw) => {
    clearTimeout(timer)
    if (pw.length < 10) {
      feedback.value = []
      isStrong.value = false
      return
    }
    timer = setTimeout(async () => {
      const n = ++asked
      const { passwordFeedback } = await import('../../shared/password-strength')
      const verdict = await passwordFeedback(pw, userInputs())
      if (n !== asked) return
      feedback.value = verdict.feedback
      isStrong.value = verdict.feedback.length === 0
    }, 250)
  })
  onScopeDispose(() => clearTimeout(timer))
  return { feedback, isStrong }
}
