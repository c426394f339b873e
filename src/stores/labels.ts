import { defineStore } from 'pinia'
import { computed, ref } from 'vue'
import type { LabelTemplate } from '../../labels/templates'
import type { LabelJob, LabelRender } from '../../labels/schemas'
import type { Move, ResolvedCode } from '../../shared/records'
import * as labelsApi from '../api/labels'

/** The kinds that can be moved by scanning (a box is a location; the server checks it is a box). */
const MOVABLE: ResolvedCode['kind'][] = ['wafer', 'chip', 'location']

/** Label templates, rendered previews, print jobs; and the scan session (last item, move target). */
export const useLabelsStore = defineStore('labels', () => {
  const templates = ref<LabelTemplate[]>([])
  const jobs = ref<LabelJob[]>([])
  const rendered = ref<LabelRender | null>(null)
  const isRendering = ref(false)

  async function fetchTemplates(): Promise<LabelTemplate[]> {
    if (!templates.value.length) templates.value = (await labelsApi.listTemplates()).templates
    return templates.value
  }
  async function fetchJobs(): Promise<void> {
    jobs.value = (await labelsApi.listLabelJobs()).jobs
  }
  async function render(template: string, codes: string[], skip = 0): Promise<LabelRender> {
    isRendering.value = true
    try {
      rendered.value = await labelsApi.renderLabels({ template, codes, skip })
      return rendered.value
    } finally {
      isRendering.value = false
    }
  }
  async function recordJob(template: string, codes: string[]): Promise<LabelJob> {
    const job = await labelsApi.recordLabelJob({ template, codes })
    jobs.value = [job, ...jobs.value.filter((j) => j.id !== job.id)]
    return job
  }

  // ---- scanning: scanning a location sets the move target; scanning an item offers the move
  const lastScan = ref<ResolvedCode | null>(null)
  const lastItem = ref<ResolvedCode | null>(null)
  const moveTarget = ref<ResolvedCode | null>(null)
  const lastMove = ref<Move | null>(null)

  async function scan(code: string): Promise<ResolvedCode> {
    const hit = await labelsApi.resolveCode(code)
    lastScan.value = hit
    lastMove.value = null
    if (hit.kind === 'location') {
      // "Scan what moves, then where it goes": a box scanned before another location becomes the item.
      const previous = moveTarget.value
      if (previous && previous.code !== hit.code && !lastItem.value) lastItem.value = previous
      moveTarget.value = hit
      if (lastItem.value?.code === hit.code) lastItem.value = null
    } else if (MOVABLE.includes(hit.kind)) lastItem.value = hit
    return hit
  }
  /** The move on offer: the last scanned item into the move target. */
  const pendingMove = computed(() =>
    lastItem.value && moveTarget.value && lastItem.value.code !== moveTarget.value.code
      ? { item: lastItem.value, to: moveTarget.value }
      : null,
  )

  async function moveHere(): Promise<Move> {
    const p = pendingMove.value
    if (!p) throw new Error('Scan an item and a location first')
    const move = await labelsApi.moveItem({
      itemCode: p.item.code,
      toLocationId: p.to.id,
      note: `scanned into ${p.to.code}`,
    })
    lastMove.value = move
    lastItem.value = null
    return move
  }
  function setTarget(hit: ResolvedCode | null): void {
    moveTarget.value = hit
    if (hit && lastItem.value?.code === hit.code) lastItem.value = null
  }

  return {
    templates,
    jobs,
    rendered,
    isRendering,
    fetchTemplates,
    fetchJobs,
    render,
    recordJob,
    lastScan,
    lastItem,
    moveTarget,
    lastMove,
    pendingMove,
    scan,
    moveHere,
    setTarget,
  }
})
