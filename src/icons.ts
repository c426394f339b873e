/**
 * Icons: one icon font (Material Icons, Quasar's default set, for ligature names such as `save`)
 * and the few Material Design Icons the app uses (`mdi-chip`, …) as inline SVG paths, so the
 * 400 kB MDI web font and its 400 kB stylesheet are not shipped. `iconMapFn` (installed in main.ts)
 * maps an `mdi-*` name to its path; add a new one here (tests/src/icons.test.ts checks every name
 * used in src/ has an entry).
 */
import {
  mdiArrowCollapseDown, mdiArrowCollapseUp, mdiArrowExpandUp, mdiAxisArrow, mdiBarcodeScan, mdiCamera,
  mdiChartBellCurve, mdiChartDonut, mdiChartLine, mdiChip, mdiCircleSlice8, mdiCog, mdiCompareHorizontal,
  mdiCubeOutline, mdiDolly, mdiDotsGrid, mdiDotsHorizontal, mdiEmailNewsletter, mdiFileCabinet,
  mdiFileDocumentOutline, mdiFileDownloadOutline, mdiFileExcelOutline, mdiFileOutline, mdiFlash,
  mdiFlaskOutline, mdiFormatColorFill, mdiGrid, mdiHistory, mdiInboxArrowDown, mdiKnife, mdiLaserPointer,
  mdiLayersPlus, mdiLayersTripleOutline, mdiMicroscope, mdiPackageVariantClosed, mdiPlusCircleOutline,
  mdiQrcode, mdiQrcodeRemove, mdiQrcodeScan, mdiRotate3dVariant, mdiSafetyGoggles, mdiSineWave,
  mdiSortDescending, mdiTagMultipleOutline, mdiTray, mdiTrayFull
} from '@quasar/extras/mdi-v7'

export const MDI_PATHS: Readonly<Record<string, string>> = {
  'mdi-arrow-collapse-down': mdiArrowCollapseDown,
  'mdi-arrow-collapse-up': mdiArrowCollapseUp,
  'mdi-arrow-expand-up': mdiArrowExpandUp,
  'mdi-axis-arrow': mdiAxisArrow,
  'mdi-barcode-scan': mdiBarcodeScan,
  'mdi-camera': mdiCamera,
  'mdi-chart-bell-curve': mdiChartBellCurve,
  'mdi-chart-donut': mdiChartDonut,
  'mdi-chart-line': mdiChartLine,
  'mdi-chip': mdiChip,
  'mdi-circle-slice-8': mdiCircleSlice8,
  'mdi-cog': mdiCog,
  'mdi-compare-horizontal': mdiCompareHorizontal,
  'mdi-cube-outline': mdiCubeOutline,
  'mdi-dolly': mdiDolly,
  'mdi-dots-grid': mdiDotsGrid,
  'mdi-dots-horizontal': mdiDotsHorizontal,
  'mdi-email-newsletter': mdiEmailNewsletter,
  'mdi-file-cabinet': mdiFileCabinet,
  'mdi-file-document-outline': mdiFileDocumentOutline,
  'mdi-file-download-outline': mdiFileDownloadOutline,
  'mdi-file-excel-outline': mdiFileExcelOutline,
  'mdi-file-outline': mdiFileOutline,
  'mdi-flash': mdiFlash,
  'mdi-flask-outline': mdiFlaskOutline,
  'mdi-format-color-fill': mdiFormatColorFill,
  'mdi-grid': mdiGrid,
  'mdi-history': mdiHistory,
  'mdi-inbox-arrow-down': mdiInboxArrowDown,
  'mdi-knife': mdiKnife,
  'mdi-laser-pointer': mdiLaserPointer,
  'mdi-layers-plus': mdiLayersPlus,
  'mdi-layers-triple-outline': mdiLayersTripleOutline,
  'mdi-microscope': mdiMicroscope,
  'mdi-package-variant-closed': mdiPackageVariantClosed,
  'mdi-plus-circle-outline': mdiPlusCircleOutline,
  'mdi-qrcode': mdiQrcode,
  'mdi-qrcode-remove': mdiQrcodeRemove,
  'mdi-qrcode-scan': mdiQrcodeScan,
  'mdi-rotate-3d-variant': mdiRotate3dVariant,
  'mdi-safety-goggles': mdiSafetyGoggles,
  'mdi-sine-wave': mdiSineWave,
  'mdi-sort-descending': mdiSortDescending,
  'mdi-tag-multiple-outline': mdiTagMultipleOutline,
  'mdi-tray': mdiTray,
  'mdi-tray-full': mdiTrayFull,
}

/** Quasar's icon map: an `mdi-*` name becomes its SVG path; anything else is left to Quasar (a Material Icons ligature). */
export function iconMapFn(name: string): { icon: string } | undefined {
  const path = name.startsWith('mdi-') ? MDI_PATHS[name] : undefined
  return path === undefined ? undefined : { icon: path }
}
