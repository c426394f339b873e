import { eq, inArray } from 'drizzle-orm'
import type { Db } from '../client'
import {
  users,
  arrays,
  chips,
  wafers,
  materials,
  fabSteps,
  laserSetups,
  laserSetupSignoffs,
  auditLog,
} from '../schema/index'
import { hazardHash } from '../../services/laser-safety/setup-hazards'
import type { Coefficient } from '../../../shared/records'
import type { ArrayInput, MaterialInput } from '../../../shared/schemas/records'
import { ENGINE_VERSION } from '../../../shared/engine'
import { createMaterial } from '../../services/inventory/materials'
import { createLocation } from '../../services/inventory/locations'
import { createWafer } from '../../services/inventory/wafers'
import { diceChips } from '../../services/inventory/chips'
import { deriveChannels } from '../../services/inventory/array-channels'
import { saveChannelSets, type KeyedChannels } from '../../services/inventory/channel-sets'
import { arrayCode } from '../../services/inventory/codes'

/**
 * The invented Kestrel Nanophotonics Group's inventory: materials with typical coefficients,
 * a storage tree, wafers of several crystals and cuts, chips diced through the services (one
 * transaction per dicing), a few hundred arrays (batched inserts, channels derived) and three
 * laser setups. Records are created by the fab technician. Each coefficient names its published
 * source; values not checked against it are marked "from memory, verify".
 */
const TYP = 'typical value, verify for your wavelength'
const c = (component: string, valuePmV: number, wavelengthNm: number, ref: string): Coefficient => ({
  component,
  order: 2,
  valuePmV,
  wavelengthNm,
  source: `${TYP}; ${ref}`,
  isTypical: true,
})
const SHOJI = 'Shoji et al., JOSA B 14, 2268 (1997)'
const PETROV = 'Petrov, Prog. Quantum Electron. 42, 1 (2015), Table 3'
const MEMORY = 'approximate literature magnitude, from memory, verify'

const MATERIALS: (Omit<MaterialInput, 'notes'> & { notes?: string })[] = [
  {
    name: 'GaAs',
    formula: 'GaAs',
    pointGroup: '-43m',
    bandGapEv: 1.424,
    transparencyNote: '0.87–17 µm; two-photon absorption at 1550 nm',
    coefficients: [c('d14', 84, 10600, PETROV), c('d14', 119, 1550, `${SHOJI} (near-gap dispersion)`)],
  },
  {
    name: 'AlGaAs (Al0.18Ga0.82As)',
    formula: 'Al0.18Ga0.82As',
    pointGroup: '-43m',
    bandGapEv: 1.648,
    transparencyNote: 'gap at 752 nm: no two-photon absorption at 1550 nm, 775 nm SH below the gap',
    coefficients: [c('d14', 100, 1550, 'χ(2)_xyz ≈ 200 pm/V used in nanophotonics models (Carletti/Gili papers)')],
  },
  {
    name: 'GaP',
    formula: 'GaP',
    pointGroup: '-43m',
    bandGapEv: 2.26,
    transparencyNote: '0.55–11 µm',
    coefficients: [c('d14', 37, 10600, PETROV), c('d14', 70, 1300, SHOJI)],
  },
  {
    name: 'ZnSe',
    formula: 'ZnSe',
    pointGroup: '-43m',
    bandGapEv: 2.7,
    transparencyNote: '0.5–20 µm',
    coefficients: [c('d14', 26.4, 10600, PETROV)],
  },
  {
    name: 'LiNbO3 (congruent)',
    formula: 'LiNbO3',
    pointGroup: '3m',
    bandGapEv: 3.8,
    transparencyNote: '0.35–5.2 µm; nₒ = 2.2322, nₑ = 2.1560 at 1064 nm',
    coefficients: [
      c('d33', 25.2, 1064, `${SHOJI}, Table 10`),
      c('d31', 4.6, 1064, `${SHOJI}, Table 10`),
      c('d22', 2.1, 1064, `${SHOJI}, Table 10`),
    ],
  },
  {
    name: 'LiTaO3',
    formula: 'LiTaO3',
    pointGroup: '3m',
    bandGapEv: 4.6,
    transparencyNote: '0.28–5.5 µm',
    coefficients: [c('d33', 13.8, 1064, SHOJI), c('d31', 0.85, 1064, SHOJI)],
  },
  {
    name: 'GaN',
    formula: 'GaN',
    pointGroup: '6mm',
    bandGapEv: 3.4,
    transparencyNote: '0.37–13 µm (wurtzite)',
    coefficients: [c('d33', 10, 1064, MEMORY), c('d31', 5, 1064, MEMORY)],
  },
  {
    name: 'ZnO',
    formula: 'ZnO',
    pointGroup: '6mm',
    bandGapEv: 3.37,
    transparencyNote: '0.37–8 µm (wurtzite)',
    coefficients: [
      c('d33', 5.9, 1064, 'literature compilations (bulk single crystal), low confidence'),
      c('d31', 1.9, 1064, 'literature compilations (bulk single crystal), low confidence'),
    ],
    notes: 'Sputtered films are far weaker: d33 0.9 pm/V at 1064 nm (Larciprete et al., Appl. Phys. B 82, 431 (2006)).',
  },
  {
    name: 'AlN',
    formula: 'AlN',
    pointGroup: '6mm',
    bandGapEv: 6.0,
    transparencyNote: '0.2–13 µm (wurtzite)',
    coefficients: [c('d33', 5, 1064, MEMORY), c('d31', 0.3, 1064, MEMORY)],
  },
  {
    name: 'α-quartz',
    formula: 'SiO2',
    pointGroup: '32',
    bandGapEv: 8.9,
    transparencyNote: '0.15–4 µm',
    coefficients: [c('d11', 0.3, 1064, SHOJI)],
  },
  {
    name: 'BBO',
    formula: 'β-BaB2O4',
    pointGroup: '3m',
    bandGapEv: 6.2,
    transparencyNote: '0.19–3.5 µm',
    coefficients: [
      c('d22', 2.2, 1064, 'Eckardt et al., IEEE JQE 26, 922 (1990)'),
      c('d31', 0.08, 1064, 'Nikogosyan 2005 (0.04–0.1)'),
    ],
  },
  {
    name: 'KTP',
    formula: 'KTiOPO4',
    pointGroup: 'mm2',
    bandGapEv: 3.5,
    transparencyNote: '0.35–4.5 µm',
    coefficients: [
      c('d33', 15.4, 1064, 'Pack, Armstrong & Smith, Appl. Opt. 43, 3319 (2004), Table 6'),
      c('d31', 2.1, 1064, 'Pack et al. 2004'),
      c('d32', 3.75, 1064, 'Pack et al. 2004'),
      c('d15', 2.0, 1064, 'Pack et al. 2004'),
      c('d24', 3.75, 1064, 'Pack et al. 2004'),
    ],
  },
  {
    name: 'MoS2 monolayer',
    formula: 'MoS2',
    pointGroup: '-6m2',
    bandGapEv: 1.9,
    transparencyNote: 'direct gap ≈ 1.9 eV (A exciton); sheet treated as a thin bulk layer',
    coefficients: [c('d22', 250, 1550, MEMORY)],
    notes: 'Odd-layer flakes only: even layer counts are centrosymmetric.',
  },
  {
    name: 'Si',
    formula: 'Si',
    pointGroup: 'm-3m',
    bandGapEv: 1.12,
    transparencyNote: '1.1–8 µm',
    coefficients: [],
    notes: 'Centrosymmetric: no bulk χ(2); surface and interface SHG only.',
  },
]

type Tree = [string, Tree[]?]
const LOCATIONS: Tree[] = [
  [
    'B2.14',
    [
      ['Cabinet 1', [['Box 1'], ['Box 2'], ['Box 3']]],
      ['Cabinet 2', [['Box 4'], ['Box 5']]],
      ['Cabinet 3', [['Box 6'], ['Box 7', [['Slot 1'], ['Slot 2'], ['Slot 3'], ['Slot 4']]]]],
    ],
  ],
  ['C1.03 Optics lab', [['Dry cabinet', [['Box 8'], ['Box 9', [['Slot 1'], ['Slot 2']]]]]]],
]
const KINDS = ['room', 'cabinet', 'box', 'slot'] as const

const WAFERS = [
  {
    m: 'GaAs',
    n: [0, 0, 1],
    f: [1, -1, 0],
    d: 50.8,
    t: 350,
    lot: 'NV-GA-2403-11',
    s: 'Norrvik Semiconductor Supply',
    notes: 'EJ flat option per certificate',
  },
  {
    m: 'GaAs',
    n: [0, 0, 1],
    f: [1, 1, 0],
    d: 76.2,
    t: 450,
    lot: 'NV-GA-2406-02',
    s: 'Norrvik Semiconductor Supply',
    notes: 'US flat option: flat along [110]',
  },
  {
    m: 'GaAs',
    n: [1, 1, 1],
    f: [1, -1, 0],
    d: 50.8,
    t: 350,
    lot: 'HS-111-0912',
    s: 'Halden Substrates',
    notes: '(111)B face up',
  },
  {
    m: 'AlGaAs (Al0.18Ga0.82As)',
    n: [0, 0, 1],
    f: [1, -1, 0],
    d: 50.8,
    t: 350,
    lot: 'KEP-AGA-018-07',
    s: 'Kestrel epi run on Norrvik GaAs',
    notes: '400 nm Al0.18GaAs on AlOx',
  },
  {
    m: 'LiNbO3 (congruent)',
    n: [0, 0, 1],
    f: [1, 0, 0],
    d: 76.2,
    t: 500,
    lot: 'OC-LN-Z-5521',
    s: 'Orcadia Crystals',
    notes: 'Z-cut, +Z face polished',
  },
  {
    m: 'LiNbO3 (congruent)',
    n: [1, 0, 0],
    f: [0, 0, 1],
    d: 76.2,
    t: 500,
    lot: 'OC-LN-X-5530',
    s: 'Orcadia Crystals',
    notes: 'X-cut thin film, 600 nm on oxide',
  },
  { m: 'GaP', n: [0, 0, 1], f: [1, -1, 0], d: 50.8, t: 300, lot: 'HS-GP-2211', s: 'Halden Substrates', notes: null },
  {
    m: 'ZnO',
    n: [0, 0, 1],
    f: [1, 0, 0],
    d: 25.4,
    t: 500,
    lot: 'OC-ZNO-Z-118',
    s: 'Orcadia Crystals',
    notes: 'Zn-face',
  },
  {
    m: 'MoS2 monolayer',
    n: [0, 0, 1],
    f: [1, 0, 0],
    d: 10,
    t: 430,
    lot: 'KEP-MOS2-CVD-31',
    s: 'Kestrel CVD run on sapphire',
    notes: 'monolayer flakes on c-sapphire; flat = zigzag edge (from SHG polar map)',
  },
]

const ARRAY_TEMPLATES: Omit<ArrayInput, 'chipId' | 'position'>[] = [
  {
    shape: 'disk',
    dimensionsNm: { diameterNm: 450, heightNm: 300 },
    shapeAzimuthDeg: 0,
    lattice: 'square',
    periodXNm: 900,
    periodYNm: 900,
    azimuthDeg: 0,
    count: 400,
    customRotationOrder: null,
    customMirrors: null,
    notes: null,
  },
  {
    shape: 'ring',
    dimensionsNm: { diameterNm: 600, innerDiameterNm: 250, heightNm: 300 },
    shapeAzimuthDeg: 0,
    lattice: 'hexagonal',
    periodXNm: 1000,
    periodYNm: null,
    azimuthDeg: 0,
    count: 400,
    customRotationOrder: null,
    customMirrors: null,
    notes: null,
  },
  {
    shape: 'triangle',
    dimensionsNm: { sideNm: 500, heightNm: 300 },
    shapeAzimuthDeg: 0,
    lattice: 'hexagonal',
    periodXNm: 950,
    periodYNm: null,
    azimuthDeg: 0,
    count: 400,
    customRotationOrder: null,
    customMirrors: null,
    notes: null,
  },
  {
    shape: 'square',
    dimensionsNm: { sideNm: 400, heightNm: 300 },
    shapeAzimuthDeg: 0,
    lattice: 'square',
    periodXNm: 850,
    periodYNm: 850,
    azimuthDeg: 0,
    count: 400,
    customRotationOrder: null,
    customMirrors: null,
    notes: null,
  },
  {
    shape: 'cross',
    dimensionsNm: { lengthNm: 600, widthNm: 120, heightNm: 300 },
    shapeAzimuthDeg: 0,
    lattice: 'square',
    periodXNm: 1000,
    periodYNm: 1000,
    azimuthDeg: 0,
    count: 400,
    customRotationOrder: null,
    customMirrors: null,
    notes: null,
  },
  {
    shape: 'gammadion',
    dimensionsNm: { armLengthNm: 500, armWidthNm: 100, heightNm: 300 },
    shapeAzimuthDeg: 0,
    lattice: 'square',
    periodXNm: 1100,
    periodYNm: 1100,
    azimuthDeg: 0,
    count: 225,
    customRotationOrder: null,
    customMirrors: null,
    notes: 'chiral, right-handed arms',
  },
  {
    shape: 'split-ring',
    dimensionsNm: { diameterNm: 500, widthNm: 100, gapNm: 80, heightNm: 300 },
    shapeAzimuthDeg: 0,
    lattice: 'rectangular',
    periodXNm: 800,
    periodYNm: 1000,
    azimuthDeg: 0,
    count: 300,
    customRotationOrder: null,
    customMirrors: null,
    notes: null,
  },
  {
    shape: 'dimer',
    dimensionsNm: { diameterNm: 300, gapNm: 60, heightNm: 300 },
    shapeAzimuthDeg: 45,
    lattice: 'rectangular',
    periodXNm: 900,
    periodYNm: 1200,
    azimuthDeg: 0,
    count: 300,
    customRotationOrder: null,
    customMirrors: null,
    notes: 'dimer axis at 45° to the lattice',
  },
  {
    shape: 'ellipse',
    dimensionsNm: { lengthNm: 500, widthNm: 300, heightNm: 300 },
    shapeAzimuthDeg: 0,
    lattice: 'rectangular',
    periodXNm: 900,
    periodYNm: 700,
    azimuthDeg: 0,
    count: 400,
    customRotationOrder: null,
    customMirrors: null,
    notes: null,
  },
  {
    shape: 'disk',
    dimensionsNm: { diameterNm: 2000, heightNm: 300 },
    shapeAzimuthDeg: 0,
    lattice: 'single',
    periodXNm: null,
    periodYNm: null,
    azimuthDeg: 0,
    count: 1,
    customRotationOrder: null,
    customMirrors: null,
    notes: 'single reference disk',
  },
]
const POSITIONS = ['A1', 'A2', 'A3', 'B1', 'B2', 'B3', 'C1', 'C2']

/** Seed the demo lab's materials, locations, wafers, chips, arrays and laser setups. */
export async function seedLab(db: Db): Promise<void> {
  const [fab] = await db.select().from(users).where(eq(users.email, 'fab@kestrel-lab.example'))
  if (!fab) throw new Error('seedLab needs the demo fab technician (seed people first)')
  const materialIds = new Map<string, number>()
  for (const m of MATERIALS)
    materialIds.set(m.name, (await createMaterial(db, fab, { ...m, notes: m.notes ?? null })).id)

  const boxes: number[] = []
  const addTree = async (nodes: Tree[], parentId: number | null, depth: number) => {
    for (const [name, children] of nodes) {
      const loc = await createLocation(db, fab, { kind: KINDS[depth], name, parentId, notes: null })
      if (KINDS[depth] === 'box') boxes.push(loc.id)
      if (children) await addTree(children, loc.id, depth + 1)
    }
  }
  await addTree(LOCATIONS, null, 0)

  let k = 0
  const chipIds: number[] = []
  for (const w of WAFERS) {
    const wafer = await createWafer(db, fab, {
      materialId: materialIds.get(w.m)!,
      cutNormal: w.n as [number, number, number],
      flatDirection: w.f as [number, number, number],
      diameterMm: w.d,
      thicknessUm: w.t,
      lot: w.lot,
      supplier: w.s,
      receivedOn: `2025-0${1 + (k % 9)}-1${k % 10}`,
      locationId: boxes[k % boxes.length],
      status: 'in_process',
      notes: w.notes,
    })
    // Chips sized so that seven of them fit the wafer with the saw's kerf (dicing refuses more).
    const size = w.d < 20 ? 2 : w.d < 30 ? 5 : 8
    for (const [rotationDeg, count] of [
      [0, 3],
      [45, 2],
      [90, 2],
    ])
      chipIds.push(
        ...(await diceChips(db, fab, {
          waferId: wafer.id,
          count,
          rotationDeg,
          widthMm: size,
          heightMm: size,
          locationId: boxes[(k + 1) % boxes.length],
          notes: null,
        })),
      )
    k++
  }
  await seedArrays(db, fab.id, chipIds)
  await seedLaserSetups(db)
}

const GOGGLE_NIR = {
  description: 'Kestrel goggle KG-7 (polycarbonate, NIR)',
  bandsNm: '740–1100',
  od: 6,
  en207: 'DIRM 740-1100 LB6',
}
const GOGGLE_VIS = { description: 'Amber visor AV-2 (blue/green)', bandsNm: '190–540', od: 5, en207: null }
const GOGGLE_TELECOM = {
  description: 'Spectacles TS-15 (1.4–1.7 µm)',
  bandsNm: '1400–1700',
  od: 5,
  en207: 'D 1400-1700 LB5',
}

/**
 * Three laser setups submitted by the optics person with realistic hazard fields; the safety
 * officer signed off two (one expiring within 14 days, so the queue shows it) and one waits.
 */
async function seedLaserSetups(db: Db): Promise<void> {
  const [optics] = await db.select().from(users).where(eq(users.email, 'optics@kestrel-lab.example'))
  const [safety] = await db.select().from(users).where(eq(users.email, 'safety@kestrel-lab.example'))
  const by = optics?.id ?? null
  const submittedAt = new Date(Date.now() - 61 * 86400_000)
  const common = {
    submittedById: by,
    submittedAt,
    interlocks: 'Door interlock on C1.03 (shutter closes when opened); key switch; emergency stop by the door',
    controlledAreaNotes:
      'Laser controlled area: warning light on while the shutter is open; beam height 12 cm, enclosed periscopes; no reflective jewellery',
  }
  await db.insert(laserSetups).values([
    {
      code: 'LS-001',
      name: 'Ti:sapphire oscillator bench',
      room: 'C1.03',
      sourceType: 'mode_locked',
      wavelengthsNm: [800, 400],
      notes: '80 MHz, ~100 fs; SH at 400 nm in a BBO crystal',
      pulseDurationFs: 100,
      repRateHz: 80e6,
      maxAvgPowerMw: 1000,
      pulseEnergyUj: 0.0125,
      beamDiameterMm: 2,
      divergenceMrad: 1,
      harmonicOrders: [2],
      laserClass: '4',
      eyewear: [GOGGLE_NIR, GOGGLE_VIS],
      ...common,
    },
    {
      code: 'LS-002',
      name: '1550 nm fibre laser bench',
      room: 'C1.03',
      sourceType: 'mode_locked',
      wavelengthsNm: [1550, 775, 517],
      notes: 'Er fibre oscillator + amplifier, ~150 fs',
      pulseDurationFs: 150,
      repRateHz: 80e6,
      maxAvgPowerMw: 200,
      pulseEnergyUj: 0.0025,
      beamDiameterMm: 1.5,
      divergenceMrad: 1.2,
      harmonicOrders: [2, 3],
      laserClass: '3B',
      eyewear: [GOGGLE_TELECOM, GOGGLE_NIR, GOGGLE_VIS],
      ...common,
    },
    {
      code: 'LS-003',
      name: '1064 nm ps laser',
      room: 'B2.14',
      sourceType: 'pulsed',
      wavelengthsNm: [1064, 532],
      notes: 'Nd:YVO4, 10 ps, 1 MHz',
      pulseDurationFs: 1e4,
      repRateHz: 1e6,
      maxAvgPowerMw: 2000,
      pulseEnergyUj: 2,
      beamDiameterMm: 1.2,
      divergenceMrad: 0.8,
      harmonicOrders: [2],
      laserClass: '4',
      eyewear: [GOGGLE_NIR],
      submittedById: by,
      submittedAt,
      interlocks: 'Interlocked enclosure; key switch',
      controlledAreaNotes: 'Room B2.14 is a laser controlled area when the enclosure is open',
    },
  ])
  if (!safety) return
  const rows = await db
    .select()
    .from(laserSetups)
    .where(inArray(laserSetups.code, ['LS-001', 'LS-002']))
  const day = (n: number) => new Date(Date.now() + n * 86400_000)
  const plan: Record<string, { expires: number; note: string }> = {
    'LS-001': { expires: 300, note: 'Enclosure and eyewear checked; alignment with the oscillator at low power only' },
    'LS-002': {
      expires: 10,
      note: 'Approved for the spring campaign; re-inspect the fibre output collimator before renewal',
    },
  }
  for (const r of rows) {
    const p = plan[r.code]
    await db.transaction(async (tx) => {
      const [{ id }] = await tx
        .insert(laserSetupSignoffs)
        .values({
          setupId: r.id,
          decision: 'approved',
          byId: safety.id,
          at: day(-60),
          expiresOn: day(p.expires).toISOString().slice(0, 10),
          note: p.note,
          hazardHash: hazardHash(r),
        })
        .$returningId()
      await tx.insert(auditLog).values({
        userId: safety.id,
        entity: 'laser_setup',
        entityId: r.id,
        action: 'signoff',
        changes: { signoff: { from: 'waiting', to: 'approved' }, signoffId: { from: null, to: id } },
        reason: p.note,
      })
    })
  }
}

/** Arrays on every chip (batched inserts with derived channels) and a few fab steps. */
async function seedArrays(db: Db, actorId: number, chipIds: number[]): Promise<void> {
  const contexts = await db
    .select({
      id: chips.id,
      code: chips.code,
      rotationDeg: chips.rotationDeg,
      cutNormal: wafers.cutNormal,
      flatDirection: wafers.flatDirection,
      pointGroup: materials.pointGroup,
    })
    .from(chips)
    .innerJoin(wafers, eq(wafers.id, chips.waferId))
    .innerJoin(materials, eq(materials.id, wafers.materialId))
    .where(inArray(chips.id, chipIds))
    .orderBy(chips.id)
  const rows: (typeof arrays.$inferInsert)[] = []
  const sets: KeyedChannels[] = []
  contexts.forEach((ctx, i) => {
    POSITIONS.forEach((position, p) => {
      const t = ARRAY_TEMPLATES[(i + p) % ARRAY_TEMPLATES.length]
      const g = { ...t, azimuthDeg: p === 7 ? 30 : 0 }
      const d = deriveChannels({
        pointGroup: ctx.pointGroup,
        cutNormal: ctx.cutNormal,
        flatDirection: ctx.flatDirection,
        chipRotationDeg: ctx.rotationDeg,
        ...g,
      })
      sets.push({ key: d.channelSetKey, channels: d.channels })
      rows.push({
        code: arrayCode(ctx.code, position),
        chipId: ctx.id,
        position,
        ...g,
        symmetryName: d.symmetryName,
        channelSetKey: d.channelSetKey,
        engineVersion: ENGINE_VERSION,
        channelsInputHash: d.hash,
        channelsComputedAt: new Date(),
      })
    })
  })
  await db.transaction(async (tx) => {
    await saveChannelSets(tx, sets)
    for (let s = 0; s < rows.length; s += 100) await tx.insert(arrays).values(rows.slice(s, s + 100))
    const made = await tx
      .select({ id: arrays.id, code: arrays.code })
      .from(arrays)
      .where(inArray(arrays.chipId, chipIds))
    await tx.insert(auditLog).values(
      made.map((a) => ({
        userId: actorId,
        entity: 'array',
        entityId: a.id,
        action: 'create' as const,
        changes: { code: { from: null, to: a.code } },
      })),
    )
    const steps = chipIds.slice(0, 12).flatMap((chipId, i): (typeof fabSteps.$inferInsert)[] => [
      {
        chipId,
        kind: 'resist' as const,
        params: { resist: 'positive e-beam resist', spinRpm: 4000, thicknessNm: 300 },
        operatorId: actorId,
        performedAt: new Date(Date.UTC(2025, 5, 2 + i, 9)),
      },
      {
        chipId,
        kind: 'exposure' as const,
        params: { tool: 'EBL 100 kV', doseUcPerCm2: 220, stepNm: 2 },
        operatorId: actorId,
        performedAt: new Date(Date.UTC(2025, 5, 2 + i, 13)),
      },
      {
        chipId,
        kind: 'etch' as const,
        params: { process: 'ICP Cl2/Ar', timeS: 95, depthNm: 300 },
        operatorId: actorId,
        performedAt: new Date(Date.UTC(2025, 5, 3 + i, 10)),
      },
      {
        chipId,
        kind: 'inspection' as const,
        params: { tool: 'SEM', result: 'sidewalls ~85°' },
        operatorId: actorId,
        performedAt: new Date(Date.UTC(2025, 5, 3 + i, 15)),
      },
    ])
    await tx.insert(fabSteps).values(steps)
    const stepIds = await tx
      .select({ id: fabSteps.id, kind: fabSteps.kind })
      .from(fabSteps)
      .where(inArray(fabSteps.chipId, chipIds))
    await tx.insert(auditLog).values(
      stepIds.map((f) => ({
        userId: actorId,
        entity: 'fab_step',
        entityId: f.id,
        action: 'create' as const,
        changes: { kind: { from: null, to: f.kind } },
      })),
    )
  })
}
