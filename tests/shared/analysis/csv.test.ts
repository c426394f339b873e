import { describe, it, expect } from 'vitest'
import { parseTable, readSweepText, AnalysisError, MAX_TABLE_ROWS } from '../../../shared/analysis'

function codeOf(f: () => unknown): string | undefined {
  try {
    f()
  } catch (e) {
    return e instanceof AnalysisError ? e.code : 'not an AnalysisError'
  }
  return undefined
}

describe('hostile tables give clear messages', () => {
  it('empty, blank and comment-only files', () => {
    for (const text of ['', '\n\n  \n', '\uFEFF# only a comment\n# another\n']) {
      expect(codeOf(() => parseTable(text))).toBe('EMPTY')
      expect(() => parseTable(text)).toThrow(/the file is empty/)
    }
  })

  it('text only', () => {
    expect(codeOf(() => readSweepText('hello world\nthis is not data\nat all\n'))).toBe('NO_NUMBERS')
    expect(() => readSweepText('<html><body>oops</body></html>\n<p>x</p>')).toThrow(
      /no row of the file could be read as numbers/,
    )
  })

  it('a single column', () => {
    expect(codeOf(() => readSweepText('angle\n0\n10\n20\n30\n'))).toBe('TOO_FEW_COLUMNS')
    expect(() => readSweepText('0\n10\n20\n')).toThrow(/needs an angle column and at least one intensity column/)
  })

  it('300 000 rows: "too large" with the limit', () => {
    const text = 'angle,I\n' + '12.5,3\n'.repeat(300_000)
    let error: unknown
    try {
      parseTable(text)
    } catch (e) {
      error = e
    }
    expect(error).toBeInstanceOf(AnalysisError)
    expect((error as AnalysisError).code).toBe('TOO_LARGE')
    expect((error as AnalysisError).message).toMatch(
      new RegExp(`too large: 300001 rows, the limit is ${MAX_TABLE_ROWS} rows`),
    )
  })

  it('more than 20 MB of text: "too large" before splitting', () => {
    expect(() => parseTable('1,2\n'.repeat(5_000_001))).toThrow(/too large: 20000004 characters/)
  })

  it('decimal commas in a ";"-separated file, mixed with decimal points', () => {
    const sweep = readSweepText('angle;I_par\n0;1,5\n10;2.5\n20;3,25\n30;1\n')
    expect(sweep.channels[0].intensity).toEqual([1.5, 2.5, 3.25, 1])
    expect(sweep.skipped).toEqual([])
  })

  it('decimal commas in a whitespace-separated file are read as decimals, not as separators', () => {
    const t = parseTable('0 1,5\n10 2,5\n20 3,5\n')
    expect(t.separator).toBe('whitespace')
    expect(t.rows).toEqual([
      [0, 1.5],
      [10, 2.5],
      [20, 3.5],
    ])
  })

  it('mixed decimal commas in a comma-separated file: those rows are reported with line numbers', () => {
    const sweep = readSweepText('angle,intensity\n0,1.5\n10,2,5\n20,3.5\n30,4.5\n')
    expect(sweep.anglesDeg).toEqual([0, 20, 30])
    expect(sweep.skipped).toEqual([
      {
        line: 3,
        reason: expect.stringMatching(/has 3 fields, expected 2 \(a decimal comma in a comma-separated file/),
      },
    ])
  })

  it('NaN, Inf and text cells: the row is skipped and named', () => {
    const sweep = readSweepText('# sweep 2024\nangle,I\n0,1\n10,NaN\n20,Inf\n30,-infinity\n40,abc\n50,2\n60,3\n')
    expect(sweep.anglesDeg).toEqual([0, 50, 60])
    expect(sweep.skipped.map((s) => s.line)).toEqual([4, 5, 6, 7])
    expect(sweep.skipped[0].reason).toMatch(/"NaN" in I/)
  })

  it('too few readable rows', () => {
    expect(codeOf(() => readSweepText('a,b\n1,2\n3,x\n'))).toBe('TOO_FEW_POINTS')
  })
})

describe('sweep columns and angle units', () => {
  it('radians are detected when max |angle| ≤ 2π, degrees otherwise, and can be overridden', () => {
    const rows = Array.from({ length: 37 }, (_, i) => i * 10)
    const deg = readSweepText(rows.map((a) => `${a}\t${a % 3}`).join('\n'))
    expect(deg.angleUnit).toBe('deg')
    const radText = rows.map((a) => `${((a * Math.PI) / 180).toFixed(6)}\t${a % 3}`).join('\n')
    const rad = readSweepText(radText)
    expect(rad.angleUnit).toBe('rad')
    expect(rad.anglesDeg[36]).toBeCloseTo(360, 3)
    expect(rad.angleUnitReason).toMatch(/radians/)
    const forced = readSweepText(radText, { angleUnit: 'deg' })
    expect(forced.anglesDeg[36]).toBeCloseTo(2 * Math.PI, 5)
  })

  it('finds the columns by their names, in any order', () => {
    const s = readSweepText('I_perp (counts),theta (deg),I_par (counts)\n1,0,5\n2,10,6\n3,20,7\n')
    expect(s.angleColumn).toBe('theta (deg)')
    expect(s.channels.map((c) => [c.column, c.analyser])).toEqual([
      ['I_par (counts)', 'parallel'],
      ['I_perp (counts)', 'perpendicular'],
    ])
  })

  it('without names, assumes angle, parallel, perpendicular and says so', () => {
    const s = readSweepText('0 5 1 9\n10 6 2 9\n20 7 3 9\n')
    expect(s.channels.map((c) => c.analyser)).toEqual(['parallel', 'perpendicular'])
    expect(s.notes.join(' ')).toMatch(/assumed parallel.*columns ignored/)
  })

  it('an unknown column override names the columns that exist', () => {
    expect(() => readSweepText('angle,I\n0,1\n1,2\n2,3\n', { angleColumn: 'phi' })).toThrow(
      /no column "phi"; the file has "angle", "I"/,
    )
  })
})
