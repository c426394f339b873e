/**
 * Label templates, as data. The server renders them to SVG (server/services/labels/label-svg.ts) and the
 * client uses the same sizes for true-size previews and the print view's `@page` rule.
 *
 * All lengths are millimetres. Print and QR conventions (ISO/IEC 18004 for the symbol; print rules
 * are common practice, docs/labels.md §3):
 * - the QR quiet zone is 4 modules on every side and is part of `qrSizeMm`'s square;
 * - a module is a whole number of printer dots at 300 dpi (1 dot = 25.4 / 300 = 0.0847 mm) and at
 *   least 3 dots (0.254 mm), the smallest a phone camera reads reliably at close range;
 * - the payload is `<PUBLIC_URL>/S/<CODE>` in upper case, so it stays in alphanumeric mode
 *   (about 1.5 × the capacity of byte mode: a smaller version, bigger modules).
 *
 * Error-correction level, chosen per template:
 * - M (≈ 15 % recoverable) on the small single labels (wafer carrier, chip box): they sit flat on a
 *   carrier lid or box, are rarely scuffed, and every module saved makes the modules bigger on a
 *   15–20 mm label. At Q a 50-character URL would need version 4 (33 modules) instead of 3 (29).
 * - Q (≈ 25 %) on the sheet labels: they go on boxes, drawers and cryo racks that get handled,
 *   rubbed and wiped with solvent, and at 63.5 × 25.4 mm there is room for the larger symbol.
 */

export type EccLevel = 'L' | 'M' | 'Q' | 'H'

/** One label's layout: QR square on the left, code and detail lines to its right. */
export interface LabelLayout {
  widthMm: number
  heightMm: number
  /** Side of the square reserved for the QR symbol including its quiet zone. */
  qrSizeMm: number
  /** Cap height of the human-readable code (font size in mm). */
  codeFontMm: number
  /** Font size of the detail lines; 0: no detail lines. */
  detailFontMm: number
  /** How many detail lines fit under the code. */
  detailLines: number
}

export interface SheetLayout {
  /** Paper name for the CSS `@page { size }` rule. */
  paper: 'A4' | 'letter'
  pageWidthMm: number
  pageHeightMm: number
  columns: number
  rows: number
  /** Top-left corner of the first label. */
  marginLeftMm: number
  marginTopMm: number
  /** Distance from one label's left (top) edge to the next one's. */
  pitchXMm: number
  pitchYMm: number
}

export interface LabelTemplate {
  id: string
  name: string
  /** What it is for, shown in the template picker. */
  purpose: string
  ecc: EccLevel
  /** Why this error-correction level (shown as a hint and kept with the template). */
  eccReason: string
  label: LabelLayout
  /** Present for sheet templates: many labels on one page. */
  sheet?: SheetLayout
}

/** 300 dpi printer dot in mm. */
export const DOT_MM = 25.4 / 300
/** Smallest module we print: 3 dots at 300 dpi (0.254 mm). */
export const MIN_MODULE_DOTS = 3
/** QR quiet zone in modules on each side (ISO/IEC 18004). */
export const QUIET_ZONE_MODULES = 4

export const LABEL_TEMPLATES: LabelTemplate[] = [
  {
    id: 'wafer-carrier',
    name: 'Wafer carrier, 40 × 20 mm',
    purpose: 'Lid of a single-wafer carrier or a wafer box',
    ecc: 'M',
    eccReason:
      'M (15 %): flat lid, rarely scuffed; the lower level keeps the symbol small so the modules stay large on a 20 mm label.',
    label: { widthMm: 40, heightMm: 20, qrSizeMm: 18, codeFontMm: 3.6, detailFontMm: 2.2, detailLines: 2 },
  },
  {
    id: 'chip-box',
    name: 'Chip box, 25 × 15 mm',
    purpose: 'Top of a small chip box or gel-pak',
    ecc: 'M',
    eccReason:
      'M (15 %): the smallest label; a higher level would push long codes to a bigger version and modules below 3 dots.',
    label: { widthMm: 25, heightMm: 15, qrSizeMm: 13.5, codeFontMm: 2.2, detailFontMm: 1.6, detailLines: 2 },
  },
  {
    id: 'sheet-a4',
    name: 'A4 sheet, 3 × 10 labels of 63.5 × 25.4 mm',
    purpose: 'Many labels at once for boxes, drawers and racks',
    ecc: 'Q',
    eccReason:
      'Q (25 %): box and rack labels get handled, rubbed and wiped; the 25 mm height leaves room for the larger symbol.',
    label: { widthMm: 63.5, heightMm: 25.4, qrSizeMm: 23.4, codeFontMm: 4, detailFontMm: 2.5, detailLines: 3 },
    // 3 × 63.5 + 2 × 2.5 = 195.5 mm wide, centred: (210 − 195.5) / 2 = 7.25 mm; 10 × 25.4 = 254 mm tall: (297 − 254) /
    // 2 = 21.5 mm.
    sheet: {
      paper: 'A4',
      pageWidthMm: 210,
      pageHeightMm: 297,
      columns: 3,
      rows: 10,
      marginLeftMm: 7.25,
      marginTopMm: 21.5,
      pitchXMm: 66,
      pitchYMm: 25.4,
    },
  },
  {
    id: 'sheet-letter',
    name: 'Letter sheet, 3 × 10 labels of 66.7 × 25.4 mm',
    purpose: 'Many labels at once on US Letter (8.5 × 11 in)',
    ecc: 'Q',
    eccReason:
      'Q (25 %): box and rack labels get handled, rubbed and wiped; the 25 mm height leaves room for the larger symbol.',
    label: { widthMm: 66.7, heightMm: 25.4, qrSizeMm: 23.4, codeFontMm: 4, detailFontMm: 2.5, detailLines: 3 },
    // 215.9 × 279.4 mm: 3 × 66.7 + 2 × 3.2 = 206.5 mm wide, left (215.9 − 206.5) / 2 = 4.7 mm; top (279.4 − 254) / 2 =
    // 12.7 mm.
    sheet: {
      paper: 'letter',
      pageWidthMm: 215.9,
      pageHeightMm: 279.4,
      columns: 3,
      rows: 10,
      marginLeftMm: 4.7,
      marginTopMm: 12.7,
      pitchXMm: 69.9,
      pitchYMm: 25.4,
    },
  },
]

export function findTemplate(id: string): LabelTemplate | undefined {
  return LABEL_TEMPLATES.find((t) => t.id === id)
}

/** Labels per sheet page (1 for single-label templates). */
export const labelsPerPage = (t: LabelTemplate) => (t.sheet ? t.sheet.columns * t.sheet.rows : 1)
