import { defineStore } from 'pinia'
import { computed, ref, shallowRef } from 'vue'
import { defineAbilityFor } from '../../shared/abilities'
import type { ChangePasswordInput, LoginInput } from '../../shared/schemas/auth'
import type { PublicUser } from '../../shared/types'
import * as authApi from '../api/auth'
import { isApiError } from '../api/http'

/** The signed-in person and what they may do. The ability object is created once (it is the one
 *  given to @casl/vue) and its rules are replaced whenever the person or their roles change. */
export const useAuthStore = defineStore('auth', () => {
  const user = ref<PublicUser | null>(null)
  /** True once we have asked the server who is signed in (so guards ask only once). */
  const isChecked = ref(false)
  const ability = shallowRef(defineAbilityFor(null))

  const isSignedIn = computed(() => user.value !== null)

  function setUser(next: PublicUser | null): void {
    user.value = next
    isChecked.value = true
    ability.value.update(defineAbilityFor(next).rules)
  }

  async function fetchMe(): Promise<PublicUser | null> {
    try {
      setUser((await authApi.fetchMe()).user)
    } catch (err) {
      if (!isApiError(err) || err.status !== 401) throw err
      setUser(null)
    }
    return user.value
  }

  async function login(input: LoginInput): Promise<PublicUser> {
    const { user: signedIn } = await authApi.login(input)
    setUser(signedIn)
    return signedIn
  }

  async function logout(): Promise<void> {
    try {
      await authApi.logout()
    } finally {
      setUser(null)
    }
  }

  async function changePassword(input: ChangePasswordInput): Promise<void> {
    await authApi.changePassword(input)
  }

  async function acceptInvite(token: string, password: string): Promise<PublicUser> {
    const { user: signedIn } = await authApi.acceptInvite({ token, password })
    setUser(signedIn)
    return signedIn
  }

  return { user, isChecked, isSignedIn, ability, setUser, fetchMe, login, logout, changePassword, acceptInvite }
})
