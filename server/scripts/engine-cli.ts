/**
 * The contract shared by the engine's command-line tools (`channels`, `polar`): read one JSON
 * request from stdin, print one JSON response on stdout (exit 0). Invalid input (bad JSON or any
 * EngineError) prints ONE line on stderr and exits 2; an unexpected internal failure prints one
 * line and exits 1.
 */
import { EngineError } from '../../shared/engine'

function readStdin(): Promise<string> {
  return new Promise((resolve, reject) => {
    const chunks: Buffer[] = []
    process.stdin.on('data', (c: Buffer) => chunks.push(c))
    process.stdin.on('end', () => resolve(Buffer.concat(chunks).toString('utf8')))
    process.stdin.on('error', reject)
  })
}

function oneLine(text: string): string {
  return text.replace(/\s*\n\s*/g, ' ').trim()
}

async function main(compute: (request: unknown) => unknown): Promise<number> {
  const text = await readStdin()
  let request: unknown
  try {
    request = JSON.parse(text)
  } catch (e) {
    process.stderr.write(`error INVALID_JSON: request: stdin is not valid JSON (${oneLine((e as Error).message)})\n`)
    return 2
  }
  try {
    process.stdout.write(`${JSON.stringify(compute(request))}\n`)
    return 0
  } catch (e) {
    if (e instanceof EngineError) {
      process.stderr.write(`error ${e.code}: ${oneLine(e.message)}\n`)
      return 2
    }
    process.stderr.write(`internal error: ${oneLine(String((e as Error)?.stack?.split('\n')[0] ?? e))}\n`)
    return 1
  }
}

/** Run `compute` on the request read from stdin and set the exit code by the contract above. */
export function runEngineCli(compute: (request: unknown) => unknown): void {
  main(compute).then((code) => {
    process.exitCode = code
  })
}
