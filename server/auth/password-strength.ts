import { passwordFeedback } from '../../shared/password-strength'
import { fieldError } from '../errors'

/** Throws a field error on `field` with the estimator's feedback when the password is too guessable. */
export async function requireStrongPassword(field: string, password: string, userInputs: string[]): Promise<void> {
  const { feedback } = await passwordFeedback(password, userInputs)
  if (feedback.length) throw fieldError(field, `This password is too easy to guess. ${feedback.join(' ')}`)
}
