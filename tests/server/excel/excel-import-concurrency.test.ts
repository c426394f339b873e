import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import mysql from 'mysql2/promise'
import type TestAgent from 'supertest/lib/agent'
import { makeChip, makeMaterial, uid } from '../inventory-helpers'
import { startImportTestApp, toBuffer, upload, workbookOf } from './excel-helpers'
import type { ImportReport } from '../../../shared/excel'

/**
 * While an import's transaction is open, other people's writes go on: registering a wafer must not
 * wait for the import (before, the import took MAX(code) … FOR UPDATE over every wafer code, and a
 * registration waited for the whole import, then failed after the 50 s lock wait timeout).
 *
 * No timing: the test holds a lock on a chip the import adds an array to, so the import stops
 * inside its transaction after writing its new wafers and chips (seen in the process list), then
 * registers a wafer and checks it is created while the import is still waiting.
 */
let t: Awaited<ReturnType<typeof startImportTestApp>>['t']
let lead: TestAgent, fab: TestAgent
beforeAll(async () => {
  ;({ t, lead, fab } = await startImportTestApp())
})
afterAll(async () => {
  await t.stop()
})

describe('Excel import and other people’s writes', () => {
  it('a wafer registered while an import is writing is created at once, and both get distinct codes', async () => {
    const { chip } = await makeChip(fab)
    const material = await makeMaterial(fab)
    const lot = `LOT-${uid()}`
    const bytes = await toBuffer(
      workbookOf({
        Wafers: [
          ['Code', 'Material', 'Cut normal', 'Flat direction', 'Diameter (mm)', 'Thickness (µm)', 'Lot'],
          ...[1, 2, 3].map((n) => [`W${n}`, material.name, '0 0 1', '1 -1 0', 50.8, 350, lot]),
        ],
        Chips: [
          ['Code', 'Wafer', 'Width (mm)', 'Height (mm)'],
          ['K1', 'W1', 5, 5],
          ['K2', 'W2', 5, 5],
        ],
        Arrays: [
          ['Chip', 'Position', 'Shape', 'Lattice', 'Diameter (nm)', 'Period X (nm)'],
          ['K1', 'A1', 'disk', 'square', 450, 900],
          [chip.code, 'Q7', 'disk', 'square', 450, 900],
        ],
      }),
    )
    const dry = (await upload(lead, bytes, true)).body as ImportReport
    expect(dry.summary).toMatchObject({ create: 7, error: 0 })

    const blocker = await mysql.createConnection(process.env.DATABASE_URL!)
    try {
      await blocker.beginTransaction()
      await blocker.query('SELECT id FROM chips WHERE id = ? FOR UPDATE', [chip.id])
      let settled = false
      const importing = upload(lead, bytes, false)
        .query({ plan: dry.planHash })
        .then((r) => {
          settled = true
          return r
        })
      // Wait (by events in the database, not by time) until the import is inside its transaction, waiting for the chip.
      for (;;) {
        const [rows] = await blocker.query(
          `SELECT COUNT(*) AS n FROM information_schema.PROCESSLIST WHERE ID <> CONNECTION_ID() AND INFO LIKE '%LOCK IN SHARE MODE%'`,
        )
        if (Number((rows as { n: number }[])[0].n) > 0) break
        if (settled)
          throw new Error(`the import finished without waiting for the chip: ${JSON.stringify((await importing).body)}`)
        await new Promise((r) => setTimeout(r, 20))
      }
      const registered = await fab.post('/api/wafers').send({
        materialId: material.id,
        cutNormal: [0, 0, 1],
        flatDirection: [1, -1, 0],
        diameterMm: 76.2,
        thicknessUm: 500,
        lot,
      })
      expect(registered.status, JSON.stringify(registered.body)).toBe(201)
      expect(settled).toBe(false) // the import is still running (waiting for the chip) while the wafer was registered
      await blocker.commit()
      const res = await importing
      expect(res.status, JSON.stringify(res.body)).toBe(201)
      const codes = (res.body as ImportReport).created!.wafers.map((w) => w.code)
      expect(codes).toHaveLength(3)
      expect(codes).not.toContain(registered.body.code)
    } finally {
      await blocker.end()
    }
  })
})
