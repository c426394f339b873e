import QRCode from 'qrcode'
import {
  DOT_MM,
  MIN_MODULE_DOTS,
  QUIET_ZONE_MODULES,
  type LabelLayout,
  type LabelTemplate,
  type SheetLayout,
} from '../../../labels/templates'

/**
 * SVG output of the label templates (labels/templates.ts). One SVG per label with its physical
 * size in mm (`width="40mm" height="20mm" viewBox="0 0 40 20"`: one user unit = 1 mm), so any
 * browser or vector tool prints it at true size. The QR symbol is drawn from the module matrix of
 * the `qrcode` package as one path, each module a whole number of 300-dpi dots.
 */

/** Roboto Condensed is bundled in the client; a standalone SVG falls back to other narrow faces. */
const FONT = "'Roboto Condensed', 'Arial Narrow', 'Liberation Sans Narrow', Arial, sans-serif"
/** Estimated advance width of a Roboto Condensed character, in em (upper case and digits). */
const CHAR_EM = 0.5
const MARGIN_MM = 1

export interface QrSymbol {
  version: number
  modules: number
  moduleMm: number
  symbolMm: number
  path: string
}

export class LabelTooSmallError extends Error {}

const mm = (v: number) => Number(v.toFixed(4)).toString()
const escapeXml = (s: string) =>
  s.replace(/[<>&'"]/g, (c) => ({ '<': '&lt;', '>': '&gt;', '&': '&amp;', "'": '&apos;', '"': '&quot;' })[c]!)

/**
 * The QR symbol for `payload` fitted into a square of `sizeMm` (quiet zone included), with the
 * module a whole number of 300-dpi dots, at least MIN_MODULE_DOTS (docs/labels.md §3). The path's
 * origin is the symbol's top-left corner, quiet zone included.
 */
export function qrSymbol(payload: string, ecc: LabelTemplate['ecc'], sizeMm: number): QrSymbol {
  const qr = QRCode.create(payload, { errorCorrectionLevel: ecc })
  const n = qr.modules.size
  const total = n + 2 * QUIET_ZONE_MODULES
  const dots = Math.floor(sizeMm / total / DOT_MM + 1e-9)
  if (dots < MIN_MODULE_DOTS) {
    throw new LabelTooSmallError(
      `${payload} needs a ${n}×${n} QR symbol; on this label its modules would be under ${MIN_MODULE_DOTS} printer dots (0.254 mm). Use a larger template.`,
    )
  }
  const m = dots * DOT_MM
  const ox = QUIET_ZONE_MODULES * m,
    oy = QUIET_ZONE_MODULES * m
  let path = ''
  for (let r = 0; r < n; r++) {
    for (let c = 0; c < n; c++) {
      if (!qr.modules.get(r, c)) continue
      let run = 1
      while (c + run < n && qr.modules.get(r, c + run)) run++
      path += `M${mm(ox + c * m)} ${mm(oy + r * m)}h${mm(run * m)}v${mm(m)}h${mm(-run * m)}z`
      c += run - 1
    }
  }
  return { version: qr.version, modules: n, moduleMm: m, symbolMm: total * m, path }
}

/** One line of text; a code too long for the width gets a smaller font rather than being cut. */
function textLine(text: string, x: number, y: number, fontMm: number, maxWidthMm: number, weight: number): string {
  const size = Math.min(fontMm, maxWidthMm / (text.length * CHAR_EM))
  return `<text x="${mm(x)}" y="${mm(y)}" font-size="${mm(size)}" font-weight="${weight}">${escapeXml(text)}</text>`
}

/** Cut a detail line to what fits (detail text is squeezed at most ~15 %, then shortened). */
function clip(text: string, fontMm: number, widthMm: number): string {
  const max = Math.max(4, Math.floor(widthMm / (CHAR_EM * 0.9 * fontMm)))
  return text.length <= max ? text : `${text.slice(0, max - 1).trimEnd()}…`
}

export interface LabelContent {
  code: string
  payload: string
  details: string[]
}

/** The elements of one label with its top-left corner at (x, y); also the QR facts. */
export function labelBody(
  layout: LabelLayout,
  ecc: LabelTemplate['ecc'],
  content: LabelContent,
  x = 0,
  y = 0,
): { body: string; qr: QrSymbol } {
  const qrBox = Math.min(layout.qrSizeMm, layout.heightMm)
  const qr = qrSymbol(content.payload, ecc, qrBox)
  const inset = (layout.heightMm - qr.symbolMm) / 2
  const tx = x + inset + qr.symbolMm
  const textWidth = x + layout.widthMm - MARGIN_MM - tx
  const details = content.details.slice(0, layout.detailFontMm > 0 ? layout.detailLines : 0)
  const lineGap = 1.3
  const blockMm = layout.codeFontMm + details.length * layout.detailFontMm * lineGap
  let baseline = y + (layout.heightMm - blockMm) / 2 + layout.codeFontMm * 0.85
  const lines = [textLine(content.code, tx, baseline, layout.codeFontMm, textWidth, 700)]
  for (const d of details) {
    baseline += layout.detailFontMm * lineGap
    lines.push(textLine(clip(d, layout.detailFontMm, textWidth), tx, baseline, layout.detailFontMm, textWidth, 400))
  }
  const body =
    `<g><title>${escapeXml(content.code)}</title>` +
    `<rect x="${mm(x)}" y="${mm(y)}" width="${mm(layout.widthMm)}" height="${mm(layout.heightMm)}" fill="#fff"/>` +
    `<path transform="translate(${mm(x + inset)} ${mm(y + inset)})" d="${qr.path}" fill="#000" shape-rendering="crispEdges"/>` +
    `<g font-family="${escapeXml(FONT)}" fill="#000">${lines.join('')}</g></g>`
  return { body, qr }
}

const svgOpen = (w: number, h: number) =>
  `<svg xmlns="http://www.w3.org/2000/svg" width="${mm(w)}mm" height="${mm(h)}mm" viewBox="0 0 ${mm(w)} ${mm(h)}">`

/** One label as a standalone SVG at its physical size. */
export function labelSvg(
  layout: LabelLayout,
  ecc: LabelTemplate['ecc'],
  content: LabelContent,
): { svg: string; qr: QrSymbol } {
  const { body, qr } = labelBody(layout, ecc, content)
  return { svg: `${svgOpen(layout.widthMm, layout.heightMm)}${body}</svg>`, qr }
}

/** Sheet pages: labels placed in the grid row by row; `skip` leaves the first cells empty. */
export function sheetSvgs(
  sheet: SheetLayout,
  layout: LabelLayout,
  ecc: LabelTemplate['ecc'],
  contents: LabelContent[],
  skip = 0,
): string[] {
  const perPage = sheet.columns * sheet.rows
  const cells: (LabelContent | null)[] = [...Array<null>(skip).fill(null), ...contents]
  const pages: string[] = []
  for (let p = 0; p * perPage < cells.length; p++) {
    const bodies = cells.slice(p * perPage, (p + 1) * perPage).map((c, i) => {
      if (!c) return ''
      const x = sheet.marginLeftMm + (i % sheet.columns) * sheet.pitchXMm
      const y = sheet.marginTopMm + Math.floor(i / sheet.columns) * sheet.pitchYMm
      return labelBody(layout, ecc, c, x, y).body
    })
    pages.push(`${svgOpen(sheet.pageWidthMm, sheet.pageHeightMm)}${bodies.join('')}</svg>`)
  }
  return pages
}
