/**
 * The engine's caches, emptied in one call (tests compare cold and warm answers; the bench times
 * cold evaluations). Each cached thing has one {@link BoundedCache} in the module that makes it:
 * point groups by spelling (point-groups.ts), parameter spaces (tensor-space.ts), solved forms
 * (tensor-forms.ts), lab-frame samples with their parities and steps (sample-tensor.ts), and pump
 * facts, structure facts and rule 4's m (channels.ts).
 */
import { clearPointGroupCache } from './point-groups'
import { clearTensorFormCache } from './tensor-forms'
import { clearSampleTensorCache } from './sample-tensor'
import { clearChannelMemos } from './channels'

/** Empty every cache of the engine; `keepForms` keeps the solved forms (and the groups they were solved for). */
export function clearEngineCaches(options: { keepForms?: boolean } = {}): void {
  if (!options.keepForms) {
    clearTensorFormCache()
    clearPointGroupCache()
  }
  clearSampleTensorCache()
  clearChannelMemos()
}
