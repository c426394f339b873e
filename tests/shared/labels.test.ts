import { describe, it, expect } from 'vitest'
import QRCode from 'qrcode'
import jsQR from 'jsqr'
import { PNG } from 'pngjs'
import { qrPayload, extractCode, QR_ALPHANUMERIC } from '../../labels/qr-payload'
import { LABEL_TEMPLATES, DOT_MM, MIN_MODULE_DOTS } from '../../labels/templates'
import { labelSvg, qrSymbol, sheetSvgs } from '../../server/services/labels/label-svg'

/**
 * Version, mode and module count of a QR symbol, computed by the `qrcode` package (a reference library we did not
 * write).
 */
function symbolOf(text: string, ecc: 'L' | 'M' | 'Q' | 'H') {
  const qr = QRCode.create(text, { errorCorrectionLevel: ecc })
  return { version: qr.version, size: qr.modules.size, modes: qr.segments.map((s) => s.mode.id) }
}

// Source: ISO/IEC 18004 capacity tables (public version tables), checked against the qrcode package.
describe('QR capacity check values (ISO/IEC 18004 capacity tables)', () => {
  it('HTTPS://LAB.EXAMPLE/S/7K2QX9 (28 alphanumeric chars) fits version 2 at Q (29)', () => {
    expect(symbolOf('HTTPS://LAB.EXAMPLE/S/7K2QX9', 'Q')).toEqual({ version: 2, size: 25, modes: ['Alphanumeric'] })
  })
  it('the same URL in lower case is byte mode and needs version 3 at M (V2-M holds 26 bytes)', () => {
    expect(symbolOf('https://lab.example/s/7k2qx9', 'M')).toEqual({ version: 3, size: 29, modes: ['Byte'] })
  })
  it('GAAS-240317-W03-C12 (19 chars) fits V1-M (20) and needs V2 at Q', () => {
    expect(symbolOf('GAAS-240317-W03-C12', 'M').version).toBe(1)
    expect(symbolOf('GAAS-240317-W03-C12', 'Q').version).toBe(2)
  })
  it('a V1 symbol with its 4-module quiet zone is 7.37 mm at 0.254 mm modules', () => {
    expect(((21 + 8) * 3 * DOT_MM).toFixed(2)).toBe('7.37')
  })
})

describe('label payload', () => {
  it('is the upper-case resolver URL, all in QR alphanumeric mode', () => {
    const p = qrPayload('https://lab.example/', 'w-0001')
    expect(p).toBe('HTTPS://LAB.EXAMPLE/S/W-0001')
    expect(p).toMatch(QR_ALPHANUMERIC)
    expect(symbolOf(p, 'M').modes).toEqual(['Alphanumeric'])
    expect(qrPayload('http://127.0.0.1:3000', 'A-0001-01-B2')).toBe('HTTP://127.0.0.1:3000/S/A-0001-01-B2')
  })
  it('keeps a case-sensitive path of the public URL as written', () => {
    expect(qrPayload('https://host.example/Overtone', 'W-0002')).toBe('HTTPS://HOST.EXAMPLE/Overtone/S/W-0002')
  })
  it('the text a template encodes is exactly the upper-case URL string', () => {
    const t = LABEL_TEMPLATES[0]
    const payload = qrPayload('https://lab.example', 'W-0001')
    const direct = QRCode.create('HTTPS://LAB.EXAMPLE/S/W-0001', { errorCorrectionLevel: t.ecc })
    expect(qrSymbol(payload, t.ecc, t.label.qrSizeMm).modules).toBe(direct.modules.size)
  })
})

describe('extractCode (what a scan or a typed text means)', () => {
  it.each([
    ['HTTP://127.0.0.1:3000/S/W-0001', 'W-0001'],
    ['https://lab.example/s/c-0001-01', 'C-0001-01'],
    ['https://lab.example/s/A-0001-01-B2?x=1', 'A-0001-01-B2'],
    ['  l-0004 ', 'L-0004'],
    ['LS-001', 'LS-001'],
  ])('%s → %s', (text, code) => expect(extractCode(text)).toBe(code))
  it.each(['', 'hello', 'https://lab.example/wafers/3', 'W-00 01'])('%j → null', (text) =>
    expect(extractCode(text)).toBeNull(),
  )
})

describe('templates', () => {
  const payload = qrPayload('https://overtone.kestrel-lab.example', 'A-0001-01-B2')
  for (const t of LABEL_TEMPLATES) {
    it(`${t.id}: exact mm size, code text, modules ≥ ${MIN_MODULE_DOTS} dots`, () => {
      const { svg, qr } = labelSvg(t.label, t.ecc, {
        code: 'A-0001-01-B2',
        payload,
        details: ['disk on a square lattice'],
      })
      expect(svg).toContain(
        `width="${t.label.widthMm}mm" height="${t.label.heightMm}mm" viewBox="0 0 ${t.label.widthMm} ${t.label.heightMm}"`,
      )
      expect(svg).toContain('>A-0001-01-B2</text>')
      expect(qr.moduleMm).toBeGreaterThanOrEqual(0.254)
      expect(qr.symbolMm).toBeLessThanOrEqual(t.label.qrSizeMm)
    })
  }
  it('a sheet places 30 labels per page and skips used cells', () => {
    const t = LABEL_TEMPLATES.find((x) => x.id === 'sheet-a4')!
    const contents = Array.from({ length: 31 }, (_, i) => ({
      code: `W-${String(i + 1).padStart(4, '0')}`,
      payload: qrPayload('https://lab.example', 'W-0001'),
      details: [],
    }))
    const pages = sheetSvgs(t.sheet!, t.label, t.ecc, contents, 2)
    expect(pages).toHaveLength(2)
    expect(pages[0]).toContain('width="210mm" height="297mm"')
    expect(pages[1].match(/<title>/g)).toHaveLength(3)
  })
  it('the QR of a label decodes back to the URL (rendered as PNG by qrcode, read by jsqr)', async () => {
    const payload = qrPayload('https://lab.example', 'C-0001-01')
    const png = PNG.sync.read(await QRCode.toBuffer(payload, { errorCorrectionLevel: 'M', scale: 4, margin: 4 }))
    expect(jsQR(new Uint8ClampedArray(png.data), png.width, png.height)?.data).toBe(payload)
  })
})
