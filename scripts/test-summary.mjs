// Add up Vitest and Playwright results (plus failed steps such as the type check, and the Vitest
// report of the Galera cluster tests when its file is given) and print the closing
// "N passed, N failed" line. Exit code 1 when anything failed or a report is missing.
import fs from 'node:fs'

const [vitestFile, playwrightFile, extraFailed = '0', clusterFile] = process.argv.slice(2)
let passed = 0
let failed = Number(extraFailed) || 0
let skipped = 0

function read(file, what) {
  try {
    return JSON.parse(fs.readFileSync(file, 'utf8'))
  } catch {
    console.log(`[overtone] no ${what} report (${file}): counted as one failure`)
    failed += 1
    return null
  }
}

/** Add one Vitest JSON report. */
function addVitest(file, what) {
  const v = read(file, what)
  if (!v) return
  passed += v.numPassedTests ?? 0
  failed += v.numFailedTests ?? 0
  skipped += (v.numPendingTests ?? 0) + (v.numTodoTests ?? 0)
  if ((v.numTotalTests ?? 0) === 0) {
    console.log(`[overtone] ${what} ran no test`)
    failed += 1
  }
  if (v.success === false && (v.numFailedTests ?? 0) === 0) {
    console.log(`[overtone] a ${what} file failed to load`)
    failed += 1
  }
  console.log(`[overtone] ${what}: ${v.numPassedTests} passed, ${v.numFailedTests} failed`)
}

addVitest(vitestFile, 'Vitest')
const p = read(playwrightFile, 'Playwright')
if (p) {
  const s = p.stats ?? {}
  passed += (s.expected ?? 0) + (s.flaky ?? 0)
  failed += s.unexpected ?? 0
  skipped += s.skipped ?? 0
  if ((p.errors ?? []).length) {
    console.log(`[overtone] Playwright errors: ${p.errors.map((e) => e.message).join('; ')}`)
    failed += 1
  }
  console.log(`[overtone] Playwright: ${(s.expected ?? 0) + (s.flaky ?? 0)} passed, ${s.unexpected ?? 0} failed`)
}
if (clusterFile) addVitest(clusterFile, 'Vitest (Galera cluster)')
console.log(`${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ''}`)
process.exit(failed > 0 ? 1 : 0)
