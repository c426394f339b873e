import { defineStore } from 'pinia'
import { computed, ref } from 'vue'
import type { ExportJob, ImportReport } from '../../shared/excel'
import * as excelApi from '../api/excel'

const POLL_MS = 500

/** The export job being watched, and the last import report (dry run or import). */
export const useExcelStore = defineStore('excel', () => {
  const job = ref<ExportJob | null>(null)
  const exportProblem = ref('')
  const report = ref<ImportReport | null>(null)
  const isChecking = ref(false)
  let timer: ReturnType<typeof setTimeout> | null = null

  const isExporting = computed(() => !!job.value && !['done', 'failed'].includes(job.value.phase))
  const progress = computed(() => (job.value && job.value.total ? job.value.done / job.value.total : 0))

  function stopPolling() {
    if (timer) clearTimeout(timer)
    timer = null
  }

  async function poll(id: string) {
    try {
      job.value = await excelApi.getExport(id)
      if (isExporting.value) timer = setTimeout(() => void poll(id), POLL_MS)
    } catch (err) {
      exportProblem.value = err instanceof Error ? err.message : 'The export could not be followed.'
    }
  }

  async function startExport(): Promise<void> {
    stopPolling()
    exportProblem.value = ''
    job.value = await excelApi.startExport()
    await poll(job.value.id)
  }

  /** Check a file (dryRun) or import it; the report replaces the previous one. */
  async function send(
    file: File,
    dryRun: boolean,
    opts: { planHash?: string; reason?: string } = {},
  ): Promise<ImportReport> {
    isChecking.value = true
    try {
      report.value = await excelApi.importWorkbook(file, dryRun, opts)
      return report.value
    } finally {
      isChecking.value = false
    }
  }

  function clearReport() {
    report.value = null
  }

  return { job, exportProblem, isExporting, progress, startExport, stopPolling, report, isChecking, send, clearReport }
})
