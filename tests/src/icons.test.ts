import { describe, it, expect } from 'vitest'
import fs from 'node:fs'
import path from 'node:path'
import { MDI_PATHS, iconMapFn } from '../../src/icons'

/** Every `mdi-*` icon name written in src/ (templates, scripts), which the MDI font no longer draws. */
function namesUsed(dir: string, found = new Set<string>()): Set<string> {
  for (const entry of fs.readdirSync(dir, { withFileTypes: true })) {
    const full = path.join(dir, entry.name)
    if (entry.isDirectory()) namesUsed(full, found)
    else if (/\.(vue|ts)$/.test(entry.name) && full !== path.join('src', 'icons.ts'))
      for (const m of fs.readFileSync(full, 'utf8').matchAll(/['"`]\s*(mdi-[a-z0-9-]+)/g)) found.add(m[1])
  }
  return found
}

describe('icons', () => {
  it('every mdi-* name used in the client has an SVG path, and other names are left to the Material Icons font', () => {
    const used = [...namesUsed('src')]
    expect(used.length).toBeGreaterThan(10)
    expect(used.filter((n) => !(n in MDI_PATHS))).toEqual([])
    for (const n of used) expect(iconMapFn(n)?.icon).toMatch(/^M\s?[\d.-]/)
    expect(iconMapFn('save')).toBeUndefined()
    expect(iconMapFn('mdi-not-an-icon')).toBeUndefined()
  })
})
