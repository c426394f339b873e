import { defineStore } from 'pinia'
import { reactive } from 'vue'
import type { StoredFile } from '../../shared/records'
import type { FileUploadInput } from '../../shared/schemas/measurements'
import * as api from '../api/files'

type Entity = FileUploadInput['entity']
const keyOf = (entity: Entity, entityId: number) => `${entity}:${entityId}`

/** Files attached to records, kept per record (`entity:id`), so several lists can share them. */
export const useFilesStore = defineStore('files', () => {
  const byRecord = reactive<Record<string, StoredFile[]>>({})

  const filesOf = (entity: Entity, entityId: number) => byRecord[keyOf(entity, entityId)] ?? []

  async function fetchFor(entity: Entity, entityId: number): Promise<StoredFile[]> {
    const files = await api.listFiles(entity, entityId)
    byRecord[keyOf(entity, entityId)] = files
    return files
  }

  async function upload(input: FileUploadInput, file: File, onProgress: (f: number) => void): Promise<StoredFile> {
    const stored = await api.uploadFile(input, file, onProgress)
    const key = keyOf(input.entity, input.entityId)
    byRecord[key] = [...(byRecord[key] ?? []), stored]
    return stored
  }

  async function retire(file: StoredFile, reason: string): Promise<void> {
    await api.retireFile(file.id, reason)
    const key = keyOf(file.entity as Entity, file.entityId)
    byRecord[key] = (byRecord[key] ?? []).filter((f) => f.id !== file.id)
  }

  return { byRecord, filesOf, fetchFor, upload, retire, tablePreview: api.getTablePreview }
})
