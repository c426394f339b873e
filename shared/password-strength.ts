import type { ZxcvbnFactory } from '@zxcvbn-ts/core'

/**
 * Password strength with the zxcvbn-ts estimator (common passwords, English words and names,
 * keyboard patterns, dates, repeats, and the person's own name and e-mail). Its dictionaries are
 * large, so they are loaded on the first check only. A score below 3 of 4 ("safely unguessable:
 * moderate protection from offline slow-hash attacks" in the estimator's own scale) is refused.
 * Used by the server (the rule) and by the password forms (the same feedback while typing).
 */
export const MIN_PASSWORD_SCORE = 3
let estimator: Promise<ZxcvbnFactory> | null = null

function load(): Promise<ZxcvbnFactory> {
  estimator ??= (async () => {
    const [{ ZxcvbnFactory }, common, en] = await Promise.all([
      import('@zxcvbn-ts/core'),
      import('@zxcvbn-ts/language-common'),
      import('@zxcvbn-ts/language-en'),
    ])
    return new ZxcvbnFactory({
      translations: en.translations,
      graphs: common.adjacencyGraphs,
      dictionary: { ...common.dictionary, ...en.dictionary },
    })
  })()
  return estimator
}

/** The estimator's verdict: its score (0–4) and feedback in plain words (empty when strong enough). */
export async function passwordFeedback(
  password: string,
  userInputs: string[] = [],
): Promise<{ score: number; feedback: string[] }> {
  const inputs = userInputs.flatMap((s) => s.toLowerCase().split(/[\s@.+_-]+/)).filter((s) => s.length >= 3)
  const result = (await load()).check(password.normalize('NFKC'), inputs)
  if (result.score >= MIN_PASSWORD_SCORE) return { score: result.score, feedback: [] }
  const { warning, suggestions } = result.feedback
  const feedback = [warning, ...suggestions].filter((s): s is string => !!s)
  return {
    score: result.score,
    feedback: feedback.length ? feedback : ['Add more words that are not common together.'],
  }
}
