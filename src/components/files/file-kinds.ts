import type { StoredFile } from '../../../shared/records'

export type FileKind = StoredFile['kind']

export const FILE_KIND_OPTIONS: { value: FileKind; label: string; icon: string; accept: string }[] = [
  { value: 'sem', label: 'SEM image', icon: 'mdi-microscope', accept: 'image/*,.tif,.tiff' },
  { value: 'spectrum', label: 'Spectrum CSV', icon: 'mdi-chart-line', accept: '.csv,.txt,text/csv' },
  { value: 'sweep', label: 'Polarisation sweep CSV', icon: 'mdi-rotate-3d-variant', accept: '.csv,.txt,text/csv' },
  { value: 'camera', label: 'Camera image', icon: 'mdi-camera', accept: 'image/*,.tif,.tiff' },
  { value: 'other', label: 'Other', icon: 'mdi-file-outline', accept: '' },
]

export const fileKindLabel = (k: string) => FILE_KIND_OPTIONS.find((o) => o.value === k)?.label ?? k
export const fileKindIcon = (k: string) => FILE_KIND_OPTIONS.find((o) => o.value === k)?.icon ?? 'mdi-file-outline'
export const isImage = (f: StoredFile) => f.hasPreview && f.mime.startsWith('image/')
export const isTable = (f: StoredFile) => f.hasPreview && f.mime === 'text/csv'

export function formatBytes(n: number): string {
  if (n < 1024) return `${n} B`
  if (n < 1024 ** 2) return `${(n / 1024).toFixed(1)} kB`
  return `${(n / 1024 ** 2).toFixed(1)} MB`
}
