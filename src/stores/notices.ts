import { defineStore } from 'pinia'
import { ref } from 'vue'
import type { MailQueueRow } from '../../shared/schemas/notices'
import * as noticesApi from '../api/notices'

/** E-mail notices: my own preference, the outgoing queue (admins) and "send the digest now". */
export const useNoticesStore = defineStore('notices', () => {
  const notifyByMail = ref<boolean | null>(null)
  const queue = ref<MailQueueRow[]>([])

  async function loadPreferences(): Promise<void> {
    notifyByMail.value = null // never show the previous person's setting while loading
    notifyByMail.value = (await noticesApi.fetchPreferences()).notifyByMail
  }

  async function setNotifyByMail(value: boolean): Promise<void> {
    notifyByMail.value = (await noticesApi.savePreferences({ notifyByMail: value })).notifyByMail
  }

  async function loadQueue(): Promise<void> {
    queue.value = (await noticesApi.listMailQueue()).queue
  }

  const sendDigestNow = () => noticesApi.sendDigestNow()

  return { notifyByMail, queue, loadPreferences, setNotifyByMail, loadQueue, sendDigestNow }
})
