/**
 * Keyboard-wedge scanners type the code they read as a burst of keystrokes ending in Enter. This
 * pure state machine tells such a burst from a person typing: at least MIN_LENGTH printable
 * characters, each within MAX_GAP_MS of the previous one, then Enter within MAX_GAP_MS.
 * Hand-held scanners send a character every few ms; fast typists manage about 80–120 ms.
 * Used by src/composables/useScanner.ts.
 */

export const MAX_GAP_MS = 40
export const MIN_LENGTH = 5

export interface BurstState {
  buffer: string
  lastAt: number
}
export const emptyBurst = (): BurstState => ({ buffer: '', lastAt: -Infinity })

/** Keys a scanner may send between characters without breaking the burst. */
const MODIFIERS = new Set(['Shift', 'CapsLock'])

/**
 * Feed one keydown (`key` as in KeyboardEvent.key, `atMs` its timestamp). Returns the next state
 * and, when this key is the Enter that ends a burst, the scanned text.
 */
export function feedKey(state: BurstState, key: string, atMs: number): { state: BurstState; scanned?: string } {
  const isQuick = atMs - state.lastAt <= MAX_GAP_MS
  if (key === 'Enter') {
    if (isQuick && state.buffer.length >= MIN_LENGTH) return { state: emptyBurst(), scanned: state.buffer }
    return { state: emptyBurst() }
  }
  if (MODIFIERS.has(key)) return { state }
  if (key.length !== 1) return { state: emptyBurst() }
  return { state: { buffer: isQuick ? state.buffer + key : key, lastAt: atMs } }
}
