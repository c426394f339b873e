import { defineStore } from 'pinia'
import { ref } from 'vue'
import type { InviteInput, UpdateUserInput } from '../../shared/schemas/auth'
import type { PublicUser } from '../../shared/types'
import * as usersApi from '../api/users'

/** The people of the lab, for the People page (admins and group leads). */
export const usePeopleStore = defineStore('people', () => {
  const people = ref<PublicUser[]>([])
  const isLoading = ref(false)

  async function fetchPeople(): Promise<void> {
    isLoading.value = true
    try {
      people.value = (await usersApi.listUsers()).users
    } finally {
      isLoading.value = false
    }
  }

  function replace(person: PublicUser): void {
    const i = people.value.findIndex((p) => p.id === person.id)
    if (i === -1) people.value.push(person)
    else people.value.splice(i, 1, person)
  }

  async function invite(input: InviteInput): Promise<PublicUser> {
    const { user } = await usersApi.inviteUser(input)
    replace(user)
    return user
  }

  async function update(id: number, input: UpdateUserInput): Promise<PublicUser> {
    const { user } = await usersApi.updateUser(id, input)
    replace(user)
    return user
  }

  /** Administrators: end a person's sessions; mail them a password-reset link. */
  const endSessions = (id: number, reason: string) => usersApi.endSessions(id, reason)
  const sendPasswordReset = (id: number, reason: string) => usersApi.sendPasswordReset(id, reason)

  return { people, isLoading, fetchPeople, invite, update, endSessions, sendPasswordReset }
})
