import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import { spawnSync } from 'node:child_process'
import { createHash, randomBytes } from 'node:crypto'
import fs from 'node:fs'
import path from 'node:path'
import mysql from 'mysql2/promise'
import { LocalDiskStorage } from '../../server/services/files/storage'
import { migrateAndSeed, startPrivateDb, type PrivateDb } from './private-db'

/**
 * Backup round trip: `npm run backup` (scripts/backup.sh) on a private, seeded database with
 * uploads, then `npm run restore` (scripts/restore.sh) into a fresh, empty database and data dir of
 * the same private MariaDB: every table has the same row count, every upload the same SHA-256, and
 * the audit triggers are back. A second restore onto the now non-empty database is refused without
 * --force.
 */
let pdb: PrivateDb
let srcUrl = '',
  dstUrl = ''
const root = process.cwd()

function run(script: string, env: Record<string, string>, args: string[] = []) {
  const r = spawnSync('bash', [path.join(root, 'scripts', script), ...args], {
    env: { ...process.env, ...env },
    encoding: 'utf8',
    timeout: 180_000,
  })
  return { code: r.status, out: r.stdout, err: r.stderr }
}

async function tableCounts(url: string): Promise<Record<string, number>> {
  const c = await mysql.createConnection(url)
  try {
    const [tables] = (await c.query(
      "SELECT table_name AS n FROM information_schema.tables WHERE table_schema = DATABASE() AND table_type = 'BASE TABLE' ORDER BY 1",
    )) as unknown as [{ n: string }[]]
    const out: Record<string, number> = {}
    for (const { n } of tables) {
      const [[row]] = (await c.query(`SELECT COUNT(*) AS k FROM \`${n}\``)) as unknown as [[{ k: number }]]
      out[n] = Number(row.k)
    }
    return out
  } finally {
    await c.end()
  }
}

function hashes(dir: string): Record<string, string> {
  const out: Record<string, string> = {}
  const walk = (d: string) => {
    for (const e of fs.existsSync(d) ? fs.readdirSync(d, { withFileTypes: true }) : []) {
      const p = path.join(d, e.name)
      if (e.isDirectory()) walk(p)
      else out[path.relative(dir, p)] = createHash('sha256').update(fs.readFileSync(p)).digest('hex')
    }
  }
  walk(dir)
  return out
}

beforeAll(async () => {
  pdb = await startPrivateDb('backup')
  srcUrl = pdb.createDatabase('overtone_src')
  dstUrl = pdb.createDatabase('overtone_dst')
  await migrateAndSeed(srcUrl)
  const storage = new LocalDiskStorage(path.join(pdb.dir, 'src-data', 'uploads'))
  for (let i = 0; i < 5; i++) await storage.put(randomBytes(1000 + i * 5000))
}, 180_000)

afterAll(async () => {
  await pdb?.destroy()
}, 120_000)

describe('npm run backup / npm run restore', () => {
  it('round trip into an empty database: same row counts per table, same upload hashes, triggers restored', async () => {
    const backupDir = path.join(pdb.dir, 'backups')
    const b = run('backup.sh', {
      DATABASE_URL: srcUrl,
      DATA_DIR: path.join(pdb.dir, 'src-data'),
      BACKUP_DIR: backupDir,
    })
    expect(b.code, b.err).toBe(0)
    const out = b.out.trim().split('\n').pop()!
    const manifest = JSON.parse(fs.readFileSync(path.join(out, 'manifest.json'), 'utf8'))
    expect(Object.keys(manifest.uploads)).toHaveLength(5)
    expect(manifest.tables.users).toBeGreaterThan(0)

    const r = run('restore.sh', { DATABASE_URL: dstUrl, DATA_DIR: path.join(pdb.dir, 'dst-data') }, [out])
    expect(r.code, r.err).toBe(0)
    expect(await tableCounts(dstUrl)).toEqual(await tableCounts(srcUrl))
    expect(hashes(path.join(pdb.dir, 'dst-data', 'uploads'))).toEqual(hashes(path.join(pdb.dir, 'src-data', 'uploads')))
    const triggers = (db: string) =>
      pdb.rootSql(`SELECT trigger_name FROM information_schema.triggers WHERE trigger_schema = '${db}' ORDER BY 1`)
    expect(triggers('overtone_dst')).toEqual(triggers('overtone_src'))

    const again = run('restore.sh', { DATABASE_URL: dstUrl, DATA_DIR: path.join(pdb.dir, 'dst-data') }, [out])
    expect(again.code).not.toBe(0)
    expect(again.err).toMatch(/not empty/)
  }, 300_000)
})
