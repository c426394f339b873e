/**
 * Large data set for the API bench: 100 000 arrays on 5 000 chips (100 wafers × 50 chips × 20
 * positions) and 20 000 measurement sessions with one result each, written with multi-row INSERTs
 * (2 000 rows per statement) straight through mysql2. Channels are computed once per
 * (material, shape, lattice) combination and reused. Run on a migrated database that holds the demo
 * lab (materials, people, laser setups): `DATABASE_URL=… tsx bench/seed-large.ts`. No audit rows are
 * written (bench data, not lab records). Prints the time it took.
 */
import mysql from 'mysql2/promise'
import { pathToFileURL } from 'node:url'
import { ENGINE_VERSION } from '../shared/engine'
import { deriveChannels, type ChannelInputs } from '../server/services/inventory/array-channels'

export const LARGE = { wafers: 100, chipsPerWafer: 50, arraysPerChip: 20, sessions: 20_000 }
const BATCH = 2000
const POSITIONS = ['A', 'B', 'C', 'D', 'E'].flatMap((r) => [1, 2, 3, 4].map((c) => `${r}${c}`))
const GEOMETRIES: Pick<ChannelInputs, 'shape' | 'dimensionsNm' | 'lattice' | 'periodXNm' | 'periodYNm'>[] = [
  {
    shape: 'disk',
    dimensionsNm: { diameterNm: 450, heightNm: 300 },
    lattice: 'square',
    periodXNm: 900,
    periodYNm: 900,
  },
  {
    shape: 'ring',
    dimensionsNm: { diameterNm: 600, innerDiameterNm: 250 },
    lattice: 'hexagonal',
    periodXNm: 1000,
    periodYNm: null,
  },
  { shape: 'triangle', dimensionsNm: { sideNm: 500 }, lattice: 'hexagonal', periodXNm: 950, periodYNm: null },
  { shape: 'square', dimensionsNm: { sideNm: 400 }, lattice: 'square', periodXNm: 850, periodYNm: 850 },
  {
    shape: 'cross',
    dimensionsNm: { lengthNm: 600, widthNm: 120 },
    lattice: 'square',
    periodXNm: 1000,
    periodYNm: 1000,
  },
  {
    shape: 'ellipse',
    dimensionsNm: { lengthNm: 500, widthNm: 300 },
    lattice: 'rectangular',
    periodXNm: 900,
    periodYNm: 700,
  },
]
const pad = (n: number, w: number) => String(n).padStart(w, '0')
const pick = <T>(xs: T[], i: number) => xs[i % xs.length]

/**
 * Multi-row INSERTs of up to BATCH rows, cut earlier when a statement would pass ~8 MB (max_allowed_packet is 16 MB).
 */
async function insert(conn: mysql.Connection, table: string, columns: string[], rows: unknown[][]): Promise<void> {
  let chunk: unknown[][] = [],
    bytes = 0
  const flush = async () => {
    if (chunk.length) await conn.query(`INSERT INTO ${table} (${columns.join(', ')}) VALUES ?`, [chunk])
    chunk = []
    bytes = 0
  }
  for (const row of rows) {
    chunk.push(row)
    bytes += row.reduce<number>((n, v) => n + (typeof v === 'string' ? v.length * 1.2 : 12), 0)
    if (chunk.length >= BATCH || bytes > 8e6) await flush()
  }
  await flush()
}

export async function seedLarge(
  url: string,
  log = (m: string) => console.error(m),
): Promise<{ seconds: number; counts: Record<string, number> }> {
  const t0 = performance.now()
  const conn = await mysql.createConnection({ uri: url, timezone: 'Z' })
  try {
    const [[mats], [users], [setups], [[maxW]]] = (await Promise.all([
      conn.query('SELECT id, point_group FROM materials WHERE retired_at IS NULL ORDER BY id'),
      conn.query('SELECT id FROM users ORDER BY id'),
      conn.query('SELECT id FROM laser_setups ORDER BY id'),
      conn.query(
        "SELECT COALESCE(MAX(CAST(SUBSTRING(code, 3) AS UNSIGNED)), 0) AS n FROM wafers WHERE code LIKE 'W-%'",
      ),
    ])) as unknown as [
      [{ id: number; point_group: string }[]],
      [{ id: number }[]],
      [{ id: number }[]],
      [[{ n: number }]],
    ]
    if (!mats.length || !users.length || !setups.length)
      throw new Error('seed the demo lab first (materials, people, laser setups)')
    await conn.query('SET unique_checks = 0, foreign_key_checks = 0')
    await conn.beginTransaction()
    const firstWafer = Number(maxW.n) + 1
    const cut: [number, number, number] = [0, 0, 1],
      flat: [number, number, number] = [1, -1, 0]
    const waferRows = Array.from({ length: LARGE.wafers }, (_, i) => {
      const n = firstWafer + i
      return [
        `W-${pad(n, 4)}`,
        pick(mats, i).id,
        JSON.stringify(cut),
        JSON.stringify(flat),
        50.8,
        350,
        `BENCH-LOT-${pad(i % 37, 3)}`,
        'Halvard Crystal Works',
        'in_stock',
        users[0].id,
      ]
    })
    await insert(
      conn,
      'wafers',
      [
        'code',
        'material_id',
        'cut_normal',
        'flat_direction',
        'diameter_mm',
        'thickness_um',
        'lot',
        'supplier',
        'status',
        'created_by',
      ],
      waferRows,
    )
    const [wRows] = (await conn.query('SELECT id, code, material_id FROM wafers WHERE code >= ? ORDER BY id', [
      `W-${pad(firstWafer, 4)}`,
    ])) as unknown as [{ id: number; code: string; material_id: number }[]]
    const chipRows: unknown[][] = []
    for (const w of wRows)
      for (let c = 1; c <= LARGE.chipsPerWafer; c++) {
        chipRows.push([
          `C-${w.code.slice(2)}-${pad(c, 2)}`,
          w.id,
          c,
          0,
          5,
          5,
          c % 7 === 0 ? 'measured' : 'in_stock',
          c % 11 === 0 ? `edge chip, batch ${c}` : null,
        ])
      }
    await insert(
      conn,
      'chips',
      ['code', 'wafer_id', 'chip_index', 'rotation_deg', 'width_mm', 'height_mm', 'status', 'notes'],
      chipRows,
    )
    const [cRows] = (await conn.query(
      'SELECT c.id, c.code, w.material_id FROM chips c JOIN wafers w ON w.id = c.wafer_id WHERE w.id >= ? ORDER BY c.id',
      [wRows[0].id],
    )) as unknown as [{ id: number; code: string; material_id: number }[]]

    // Channels: computed once per (material, shape, lattice) and stored once in channel_sets (the
    // app's content-addressed store); each array row carries only the set's key.
    const groupOf = new Map(mats.map((m) => [m.id, m.point_group]))
    const derived = new Map<string, { symmetryName: string; channels: string; setKey: string; hash: string }>()
    const arrayRows: unknown[][] = []
    const now = new Date()
    cRows.forEach((chip, ci) => {
      POSITIONS.forEach((position, pi) => {
        const g = pick(GEOMETRIES, ci + pi)
        const key = `${chip.material_id}|${g.shape}|${g.lattice}`
        let d = derived.get(key)
        if (!d) {
          const x = deriveChannels({
            ...g,
            pointGroup: groupOf.get(chip.material_id)!,
            cutNormal: cut,
            flatDirection: flat,
            chipRotationDeg: 0,
            shapeAzimuthDeg: 0,
            azimuthDeg: 0,
            customRotationOrder: null,
            customMirrors: null,
          })
          d = {
            symmetryName: x.symmetryName,
            channels: JSON.stringify(x.channels),
            setKey: x.channelSetKey,
            hash: x.hash,
          }
          derived.set(key, d)
        }
        const note = (ci * 20 + pi) % 50 === 0 ? `dose test ${ci % 13}` : null
        arrayRows.push([
          `A-${chip.code.slice(2)}-${position}`,
          chip.id,
          position,
          g.shape,
          JSON.stringify(g.dimensionsNm),
          0,
          g.lattice,
          g.periodXNm,
          g.periodYNm,
          0,
          400,
          d.symmetryName,
          d.setKey,
          ENGINE_VERSION,
          d.hash,
          now,
          note,
        ])
      })
    })
    const sets = [
      ...new Map([...derived.values()].map((d) => [d.setKey, [d.setKey, d.channels, ENGINE_VERSION]])).values(),
    ]
    await conn.query(
      `INSERT IGNORE INTO channel_sets (set_key, channels, engine_version) VALUES ${sets.map(() => '(?, ?, ?)').join(', ')}`,
      sets.flat(),
    )
    await insert(
      conn,
      'arrays',
      [
        'code',
        'chip_id',
        'position',
        'shape',
        'dimensions_nm',
        'shape_azimuth_deg',
        'lattice',
        'period_x_nm',
        'period_y_nm',
        'azimuth_deg',
        'count',
        'symmetry_name',
        'channel_set_key',
        'engine_version',
        'channels_input_hash',
        'channels_computed_at',
        'notes',
      ],
      arrayRows,
    )

    const [[maxS]] = (await conn.query(
      "SELECT COALESCE(MAX(CAST(SUBSTRING(code, 3) AS UNSIGNED)), 0) AS n FROM measurement_sessions WHERE code LIKE 'S-%'",
    )) as unknown as [[{ n: number }]]
    const firstS = Number(maxS.n) + 1
    const [[firstArray]] = (await conn.query('SELECT MIN(id) AS id FROM arrays WHERE chip_id >= ?', [
      cRows[0].id,
    ])) as unknown as [[{ id: number }]]
    const sessionRows = Array.from({ length: LARGE.sessions }, (_, i) => [
      `S-${pad(firstS + i, 4)}`,
      pick(setups, i).id,
      pick(users, i).id,
      new Date(Date.UTC(2023, 0, 1) + i * 3_600_000),
      pick([800, 1030, 1550], i),
      20 + (i % 50),
      JSON.stringify(i % 2 ? { type: 'circular', m: 1 } : { type: 'linear', angle: 0 }),
      i % 3 === 0 ? 3 : 2,
      'transmission',
      'normal',
      i % 97 === 0 ? `alignment check ${i}` : null,
    ])
    await insert(
      conn,
      'measurement_sessions',
      [
        'code',
        'laser_setup_id',
        'operator_id',
        'performed_at',
        'wavelength_nm',
        'avg_power_mw',
        'pump',
        'harmonic_order',
        'geometry',
        'collection',
        'notes',
      ],
      sessionRows,
    )
    const [[firstSession]] = (await conn.query('SELECT id FROM measurement_sessions WHERE code = ?', [
      `S-${pad(firstS, 4)}`,
    ])) as unknown as [[{ id: number }]]
    const resultRows = Array.from({ length: LARGE.sessions }, (_, i) => [
      firstSession.id + i,
      firstArray.id + ((i * 5) % arrayRows.length),
      1e-9 * (1 + (i % 10)),
      'not_checked',
      '[]',
    ])
    await insert(
      conn,
      'session_results',
      ['session_id', 'array_id', 'harmonic_power_w', 'observed_normal', 'observed_m'],
      resultRows,
    )
    await conn.commit()
    await conn.query('ANALYZE TABLE wafers, chips, arrays, measurement_sessions, session_results')
    const seconds = (performance.now() - t0) / 1000
    const counts = {
      wafers: waferRows.length,
      chips: chipRows.length,
      arrays: arrayRows.length,
      sessions: sessionRows.length,
    }
    log(
      `[bench] large seed: ${JSON.stringify(counts)} in ${seconds.toFixed(1)} s (${derived.size} channel computations reused)`,
    )
    return { seconds, counts }
  } catch (e) {
    await conn.rollback().catch(() => {})
    throw e
  } finally {
    await conn.end()
  }
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  const url = process.env.DATABASE_URL
  if (!url) {
    console.error('DATABASE_URL is not set')
    process.exit(2)
  }
  seedLarge(url).then(
    (r) => console.log(JSON.stringify(r)),
    (e) => {
      console.error(`large seed failed: ${String((e as Error).message).slice(0, 300)}`)
      process.exit(1)
    },
  )
}
