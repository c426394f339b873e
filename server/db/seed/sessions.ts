import { asc, eq, isNull } from 'drizzle-orm'
import type { Db } from '../client'
import {
  arrays,
  chips,
  files,
  laserSetups,
  laserSetupSignoffs,
  materials,
  measurementSessions,
  sessionResults,
  users,
  wafers,
} from '../schema/index'
import type { PumpSpec } from '../../../shared/engine'
import { writeAudit, diffFields } from '../../services/audit/audit'
import { nextCode } from '../../services/laser-safety/laser-setups'
import { compareResult, loadArrayContexts, type ArrayContext } from '../../services/measurements/session-compare'
import { createFileStorage } from '../../services/files/create-storage'
import type { FileStorage } from '../../services/files/storage'
import { loadFileStorageEnv } from '../../env'

/**
 * A few measurement sessions by the optics person on the seeded arrays and laser setups, each with
 * a small synthetic spectrum (Gaussian peak at λ/N plus noise). Copes with whatever seedLab made:
 * a session whose arrays are missing is skipped quietly.
 */
type Observed = 'not_checked' | 'none' | 'present' | 'co' | 'counter' | 'linear'
interface Plan {
  pick: (a: ArrayContext & { material: string; shape: string }) => boolean
  wavelengthNm: number
  order: number
  pump: PumpSpec
  observed: Observed
  powerMw: number
  harmonicW: number
  daysAgo: number
  notes: string
  want?: 'forbidden'
}

const PLANS: Plan[] = [
  {
    pick: (a) => a.material.startsWith('AlGaAs') && a.shape === 'disk',
    wavelengthNm: 1550,
    order: 2,
    pump: { type: 'circular', m: 1 },
    observed: 'none',
    powerMw: 12,
    harmonicW: 2.4e-9,
    daysAgo: 21,
    notes:
      'SHG 1550 → 775 nm on AlGaAs disks, circular pump; nothing along the normal (doughnut in the back-focal plane).',
  },
  {
    pick: (a) => a.cutNormal.join() === '1,1,1' && a.shape === 'triangle',
    wavelengthNm: 1550,
    order: 2,
    pump: { type: 'circular', m: 1 },
    observed: 'counter',
    powerMw: 8,
    harmonicW: 6.5e-10,
    daysAgo: 14,
    notes: 'GaAs (111) triangles: normal SH counter-rotating to the pump, as expected.',
  },
  {
    pick: (a) => a.cutNormal.join() === '0,0,1' && a.shape === 'square',
    wavelengthNm: 1550,
    order: 2,
    pump: { type: 'circular', m: -1 },
    observed: 'present',
    powerMw: 10,
    harmonicW: 3.1e-10,
    daysAgo: 9,
    want: 'forbidden',
    notes: 'Weak spot on axis in the back-focal plane; suspect sample tilt. Re-check alignment.',
  },
  {
    pick: (a) => a.material.startsWith('AlGaAs') && a.shape !== 'disk',
    wavelengthNm: 1550,
    order: 3,
    pump: { type: 'linear', angle: 0 },
    observed: 'linear',
    powerMw: 15,
    harmonicW: 4.0e-11,
    daysAgo: 5,
    notes: 'THG 1550 → 517 nm, linear pump along the flat.',
  },
  {
    pick: (a) => a.cutNormal.join() === '0,0,1' && a.shape === 'cross',
    wavelengthNm: 1560,
    order: 2,
    pump: { type: 'linear', angle: 45 },
    observed: 'not_checked',
    powerMw: 9,
    harmonicW: 1.2e-9,
    daysAgo: 2,
    notes: 'Polarisation sweep of the crosses; normal channel not analysed.',
  },
]

/** A synthetic spectrum around λ/N: Gaussian peak plus a small deterministic ripple as "noise". */
export function syntheticSpectrum(pumpNm: number, order: number, seed: number): Buffer {
  const centre = pumpNm / order
  const lines = ['wavelength_nm,counts']
  for (let i = 0; i <= 400; i++) {
    const x = centre - 20 + i * 0.1
    const noise = 12 * Math.abs(Math.sin(seed * 12.9898 + i * 78.233))
    lines.push(`${x.toFixed(2)},${(800 * Math.exp(-(((x - centre) / 1.6) ** 2)) + 40 + noise).toFixed(1)}`)
  }
  return Buffer.from(lines.join('\n') + '\n')
}

/** `storage` defaults to the one the server would use (FILE_STORAGE and S3_* from the environment). */
export async function seedSessions(
  db: Db,
  storage: FileStorage = createFileStorage(process.env.DATA_DIR ?? '.data', loadFileStorageEnv()),
): Promise<void> {
  const [optics] = await db.select().from(users).where(eq(users.email, 'optics@kestrel-lab.example'))
  // Only signed-off setups may carry sessions (issue 5).
  const approved = new Set(
    (
      await db
        .select({ id: laserSetupSignoffs.setupId })
        .from(laserSetupSignoffs)
        .where(eq(laserSetupSignoffs.decision, 'approved'))
    ).map((r) => r.id),
  )
  const setups = (
    await db.select().from(laserSetups).where(isNull(laserSetups.retiredAt)).orderBy(asc(laserSetups.code))
  ).filter((s) => approved.has(s.id))
  if (!optics || !setups.length) return
  const all = await db.select({ id: arrays.id }).from(arrays).where(isNull(arrays.retiredAt)).orderBy(asc(arrays.id))
  const ctx = await loadArrayContexts(
    db,
    all.map((a) => a.id),
  )
  const names = await arrayNames(db)
  const setup = (nm: number) => setups.find((s) => s.wavelengthsNm.includes(nm)) ?? setups[0]
  for (const [i, plan] of PLANS.entries()) {
    const candidates = [...ctx.values()].filter((a) => plan.pick({ ...a, ...names.get(a.id)! }))
    const chosen = candidates
      .filter(
        (a) =>
          plan.want !== 'forbidden' ||
          !compareResult(a, { observedNormal: 'present', observedM: [] }, plan.pump, plan.order).predicted
            .normalEmission.allowed,
      )
      .slice(0, 2)
    if (!chosen.length) continue
    const performedAt = new Date(Date.now() - plan.daysAgo * 86400_000)
    await db.transaction(async (tx) => {
      const code = await nextCode(tx, 'measurement_sessions', 'S', 4)
      const values = {
        code,
        laserSetupId: setup(plan.wavelengthNm).id,
        operatorId: optics.id,
        performedAt,
        createdAt: new Date(performedAt.getTime() + 40 * 60_000),
        wavelengthNm: plan.wavelengthNm,
        pulseDurationFs: 150,
        repRateHz: 80e6,
        avgPowerMw: plan.powerMw,
        spotDiameterUm: 2.2,
        objectiveNa: 0.7,
        pump: plan.pump,
        harmonicOrder: plan.order,
        geometry: 'reflection' as const,
        collection: 'normal' as const,
        analyser: plan.observed === 'co' || plan.observed === 'counter' ? 'QWP + linear polariser' : null,
        detector: 'Cooled sCMOS behind a 300 mm spectrometer',
        integrationS: 2,
        filters: plan.order === 2 ? '775/25 band-pass, 900 short-pass' : '520/20 band-pass, 900 short-pass',
        notes: plan.notes,
      }
      const [{ id }] = await tx.insert(measurementSessions).values(values).$returningId()
      const results = chosen.map((a, k) => ({
        sessionId: id,
        arrayId: a.id,
        harmonicPowerW: plan.harmonicW * (1 + 0.3 * k),
        observedNormal: plan.observed,
        observedM: [],
        notes: null,
      }))
      await tx.insert(sessionResults).values(results)
      await writeAudit(tx, {
        userId: optics.id,
        entity: 'session',
        entityId: id,
        action: 'create',
        changes: diffFields({}, { ...values, results }),
      })
      const { sha256, sizeBytes } = await storage.put(syntheticSpectrum(plan.wavelengthNm, plan.order, i + 1))
      const file = {
        sha256,
        originalName: `${code}-spectrum.csv`,
        mime: 'text/csv',
        sizeBytes,
        kind: 'spectrum' as const,
        entity: 'session',
        entityId: id,
        uploadedBy: optics.id,
        uploadedAt: values.createdAt,
      }
      const [{ id: fileId }] = await tx.insert(files).values(file).$returningId()
      await writeAudit(tx, {
        userId: optics.id,
        entity: 'file',
        entityId: fileId,
        action: 'create',
        changes: diffFields({}, file),
      })
    })
  }
}

async function arrayNames(db: Db) {
  const rows = await db
    .select({ id: arrays.id, shape: arrays.shape, material: materials.name })
    .from(arrays)
    .innerJoin(chips, eq(chips.id, arrays.chipId))
    .innerJoin(wafers, eq(wafers.id, chips.waferId))
    .innerJoin(materials, eq(materials.id, wafers.materialId))
  return new Map(rows.map((r) => [r.id, { material: r.material, shape: r.shape }]))
}
