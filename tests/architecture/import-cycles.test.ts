import { describe, it, expect } from 'vitest'
import fs from 'node:fs'
import path from 'node:path'
import ts from 'typescript'

// No module may reach itself through value imports (type-only imports vanish at build time).
// Imports are read with the TypeScript compiler's own pre-processor, cycles found by a depth-first
// search; the folders are the server's and the shared code's.
const root = path.resolve(__dirname, '../..')

function sourceFiles(dir: string): string[] {
  return fs.readdirSync(dir, { withFileTypes: true }).flatMap((e) => {
    const p = path.join(dir, e.name)
    if (e.isDirectory()) return e.name === 'node_modules' ? [] : sourceFiles(p)
    return e.name.endsWith('.ts') && !e.name.endsWith('.d.ts') ? [p] : []
  })
}

function valueImports(file: string): string[] {
  const text = fs.readFileSync(file, 'utf8')
  const source = ts.createSourceFile(file, text, ts.ScriptTarget.Latest, true)
  const specs: string[] = []
  for (const st of source.statements) {
    if (ts.isImportDeclaration(st) && !st.importClause?.isTypeOnly && ts.isStringLiteral(st.moduleSpecifier)) {
      const bindings = st.importClause?.namedBindings
      const onlyTypes =
        !st.importClause?.name &&
        bindings &&
        ts.isNamedImports(bindings) &&
        bindings.elements.length > 0 &&
        bindings.elements.every((el) => el.isTypeOnly)
      if (!onlyTypes) specs.push(st.moduleSpecifier.text)
    }
    if (ts.isExportDeclaration(st) && !st.isTypeOnly && st.moduleSpecifier && ts.isStringLiteral(st.moduleSpecifier))
      specs.push(st.moduleSpecifier.text)
  }
  return specs
    .filter((s) => s.startsWith('.'))
    .map((s) => {
      const base = path.resolve(path.dirname(file), s)
      return (
        [base, `${base}.ts`, path.join(base, 'index.ts')].find((c) => fs.existsSync(c) && fs.statSync(c).isFile()) ?? ''
      )
    })
    .filter(Boolean)
}

function findCycles(files: string[]): string[][] {
  const graph = new Map(files.map((f) => [f, valueImports(f)]))
  const state = new Map<string, 'open' | 'done'>()
  const stack: string[] = []
  const cycles: string[][] = []
  const visit = (f: string) => {
    state.set(f, 'open')
    stack.push(f)
    for (const g of graph.get(f) ?? []) {
      if (state.get(g) === 'open') cycles.push([...stack.slice(stack.indexOf(g)), g].map((p) => path.relative(root, p)))
      else if (!state.has(g)) visit(g)
    }
    stack.pop()
    state.set(f, 'done')
  }
  for (const f of files) if (!state.has(f)) visit(f)
  return cycles
}

describe('module structure', () => {
  it('finds a cycle when there is one (the check itself can fail)', () => {
    const dir = fs.mkdtempSync(path.join(root, '.cycle-probe-'))
    try {
      fs.writeFileSync(path.join(dir, 'a.ts'), "import { b } from './b'\nexport const a = () => b\n")
      fs.writeFileSync(path.join(dir, 'b.ts'), "import { a } from './a'\nexport const b = () => a\n")
      fs.writeFileSync(path.join(dir, 'c.ts'), "import type { a } from './a'\nexport type C = typeof a\n")
      expect(findCycles(sourceFiles(dir)).length).toBeGreaterThan(0)
    } finally {
      fs.rmSync(dir, { recursive: true, force: true })
    }
  })

  it('server/, shared/ and labels/ have no import cycles', () => {
    const files = ['server', 'shared', 'labels'].flatMap((d) => sourceFiles(path.join(root, d)))
    expect(files.length).toBeGreaterThan(100)
    expect(findCycles(files)).toEqual([])
  })
})
