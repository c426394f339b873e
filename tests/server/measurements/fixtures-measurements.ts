import { eq } from 'drizzle-orm'
import {
  arrays,
  chips,
  laserSetups,
  laserSetupSignoffs,
  materials,
  users,
  wafers,
} from '../../../server/db/schema/index'
import { hazardHash } from '../../../server/services/laser-safety/setup-hazards'
import type { Db } from '../../../server/db/client'
import { demoEmail } from '../helpers'

/**
 * Rows the measurement tests need, inserted directly (independent of the inventory services).
 * Codes carry a random tag so tests never collide with each other or with seeded data.
 */
const tag = () => `${Date.now().toString(36)}${Math.floor(Math.random() * 1e6).toString(36)}`.toUpperCase()

export interface ArraySpec {
  shape?: string
  lattice?: string
  azimuthDeg?: number
  position?: string
}

export async function makeSample(
  db: Db,
  opts: {
    pointGroup?: string
    cutNormal?: [number, number, number]
    flatDirection?: [number, number, number]
    chipRotationDeg?: number
    arrays?: ArraySpec[]
  } = {},
) {
  const t = tag()
  const [fab] = await db
    .select()
    .from(users)
    .where(eq(users.email, demoEmail('fab_technician')))
  const [{ id: materialId }] = await db
    .insert(materials)
    .values({ name: `Test GaAs ${t}`, formula: 'GaAs', pointGroup: opts.pointGroup ?? '-43m', coefficients: [] })
    .$returningId()
  const [{ id: waferId }] = await db
    .insert(wafers)
    .values({
      code: `W-T${t}`,
      materialId,
      cutNormal: opts.cutNormal ?? [0, 0, 1],
      flatDirection: opts.flatDirection ?? [1, 1, 0],
      diameterMm: 50.8,
      thicknessUm: 350,
      lot: `T-${t}`,
      createdBy: fab.id,
    })
    .$returningId()
  const [{ id: chipId }] = await db
    .insert(chips)
    .values({ code: `C-T${t}-01`, waferId, index: 1, rotationDeg: opts.chipRotationDeg ?? 0, widthMm: 5, heightMm: 5 })
    .$returningId()
  const specs = opts.arrays ?? [{ shape: 'disk', lattice: 'square' }]
  const arrayRows: { id: number; code: string }[] = []
  for (const [i, s] of specs.entries()) {
    const position = s.position ?? `B${i + 1}`
    const code = `A-T${t}-01-${position}`
    const [{ id }] = await db
      .insert(arrays)
      .values({
        code,
        chipId,
        position,
        shape: s.shape ?? 'disk',
        dimensionsNm: { diameterNm: 450, heightNm: 300 },
        lattice: s.lattice ?? 'square',
        periodXNm: 1000,
        periodYNm: 1000,
        azimuthDeg: s.azimuthDeg ?? 0,
        count: 400,
      })
      .$returningId()
    arrayRows.push({ id, code })
  }
  return { materialId, waferId, chipId, chipCode: `C-T${t}-01`, arrays: arrayRows }
}

/**
 * A laser setup inserted directly; by default signed off by the demo safety officer (sessions need a
 * valid sign-off). `signoff: 'none'` leaves it waiting; `'expired'` gives an approval that expired yesterday.
 * `extra` sets further columns (e.g. the maximum average power) before the sign-off.
 */
export async function makeLaserSetup(
  db: Db,
  retired = false,
  signoff: 'approved' | 'none' | 'expired' = 'approved',
  extra: Partial<typeof laserSetups.$inferInsert> = {},
) {
  const t = tag()
  const code = `LS-T${t}`.slice(0, 20)
  const [{ id }] = await db
    .insert(laserSetups)
    .values({
      code,
      name: `Test OPO ${t}`,
      room: 'B2.14',
      sourceType: 'mode_locked',
      wavelengthsNm: [1550, 775],
      retiredAt: retired ? new Date() : null,
      submittedAt: new Date(),
      ...extra,
    })
    .$returningId()
  if (signoff !== 'none') {
    const [row] = await db.select().from(laserSetups).where(eq(laserSetups.id, id))
    const [safety] = await db
      .select()
      .from(users)
      .where(eq(users.email, demoEmail('safety_officer')))
    const expiresOn = new Date(Date.now() + (signoff === 'expired' ? -1 : 90) * 86400_000).toISOString().slice(0, 10)
    await db.insert(laserSetupSignoffs).values({
      setupId: id,
      decision: 'approved',
      byId: safety.id,
      expiresOn,
      note: 'test sign-off',
      hazardHash: hazardHash(row),
    })
  }
  return { id, code }
}

/** A valid session body on the given arrays (SHG, circular +1, 1550 nm, 10 mW). */
export function sessionBody(laserSetupId: number, arrayIds: number[], extra: Record<string, unknown> = {}) {
  return {
    laserSetupId,
    performedAt: new Date(Date.now() - 3600_000).toISOString(),
    wavelengthNm: 1550,
    pulseDurationFs: 150,
    repRateHz: 80e6,
    avgPowerMw: 10,
    spotDiameterUm: 2.5,
    objectiveNa: 0.7,
    pump: { type: 'circular', m: 1 },
    harmonicOrder: 2,
    geometry: 'reflection',
    collection: 'normal',
    detector: 'Test PMT',
    results: arrayIds.map((arrayId) => ({ arrayId, observedNormal: 'none' })),
    safetyNotesRead: true,
    ...extra,
  }
}
