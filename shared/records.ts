import type { ChannelResponse, PumpSpec } from './engine'
import type { Role } from './roles'

/**
 * API response shapes of the sample records. Dates are ISO strings; units in the field names.
 * Every record has a short human code printed on its label and resolved by `/s/<code>`.
 */

export interface Page<T> {
  rows: T[]
  total: number
  page: number
  pageSize: number
}

export interface PersonRef {
  id: number
  name: string
}
export interface LocationRef {
  id: number
  code: string
  path: string
}

export interface Coefficient {
  component: string
  order: 2 | 3
  valuePmV: number
  wavelengthNm: number
  source: string
  isTypical: boolean
}
export interface Material {
  id: number
  name: string
  formula: string
  pointGroup: string
  bandGapEv: number | null
  transparencyNote: string | null
  notes: string | null
  coefficients: Coefficient[]
  retiredAt: string | null
  createdAt: string
  updatedAt: string
}
/** A material with the engine's χ(2) d-matrix form for its point group (standard setting). */
export interface MaterialDetail extends Material {
  dMatrix: { rows: string[][]; equalities: string[]; independent: number; setting: string }
  waferCount: number
}

export interface Location {
  id: number
  code: string
  kind: 'room' | 'cabinet' | 'box' | 'slot'
  name: string
  parentId: number | null
  path: string
  notes: string | null
  itemCount: number
  retiredAt: string | null
}
export interface Move {
  id: number
  itemCode: string
  from: LocationRef | null
  to: LocationRef | null
  handedTo: PersonRef | null
  movedBy: PersonRef
  movedAt: string
  note: string | null
}

export type WaferStatus = 'in_stock' | 'in_process' | 'used_up' | 'retired'
export interface Wafer {
  id: number
  code: string
  material: { id: number; name: string; pointGroup: string }
  cutNormal: [number, number, number]
  flatDirection: [number, number, number]
  /** e.g. "(001)" for cubic, "Z-cut" for the others. */
  cutLabel: string
  diameterMm: number
  thicknessUm: number
  lot: string
  supplier: string | null
  receivedOn: string | null
  location: LocationRef | null
  status: WaferStatus
  notes: string | null
  chipCount: number
  createdBy: PersonRef
  createdAt: string
  updatedAt: string
}

export type ChipStatus = 'in_stock' | 'in_process' | 'measured' | 'used_up' | 'retired'
export interface Chip {
  id: number
  code: string
  wafer: { id: number; code: string; cutLabel: string; materialName: string }
  index: number
  rotationDeg: number
  widthMm: number
  heightMm: number
  location: LocationRef | null
  holder: PersonRef | null
  status: ChipStatus
  notes: string | null
  arrayCount: number
  createdAt: string
  updatedAt: string
}

export interface FabStep {
  id: number
  chipId: number
  kind: string
  params: Record<string, string | number>
  operator: PersonRef
  performedAt: string
  notes: string | null
  createdAt: string
}

/** One computed channel set stored with an array (standard pumps × orders 2 and 3). */
export interface StoredChannel {
  order: number
  /** 'circular+1' | 'circular-1' | 'linear-along-flat' | 'linear-across-flat' */
  pumpKey: string
  pump: PumpSpec
  result: ChannelResponse
}
/** An array as a list shows it (no channels: a list shows only whether they are stale). */
export interface ArrayRow {
  id: number
  code: string
  chip: { id: number; code: string }
  position: string
  shape: string
  dimensionsNm: Record<string, number>
  shapeAzimuthDeg: number
  lattice: string
  periodXNm: number | null
  periodYNm: number | null
  azimuthDeg: number
  count: number
  customRotationOrder: number | null
  customMirrors: number[] | null
  /** Structure symmetry at normal incidence, e.g. "C4v", with its mirrors in the wafer-flat frame. */
  symmetry: { name: string; rotationOrder: number; mirrors: number[] | 'all' }
  engineVersion: string | null
  channelsComputedAt: string | null
  /** True when the stored channels were computed by another engine version or for other inputs. */
  isStale: boolean
  notes: string | null
  retiredAt: string | null
  createdAt: string
  updatedAt: string
}
/** An array as its own page shows it: with the stored channels for the standard pumps. */
export interface ArrayRecord extends ArrayRow {
  channels: StoredChannel[]
}

/** One eyewear entry of a laser setup: bands in nm as text (`720–850, 1064`), OD and/or an EN 207 marking. */
export interface EyewearEntry {
  description: string
  bandsNm: string
  od: number | null
  en207: string | null
}
export type LaserClass = '1' | '1M' | '2' | '2M' | '3R' | '3B' | '4'
export type SignoffState = 'draft' | 'waiting' | 'approved' | 'expired' | 'rejected' | 'revoked' | 'voided'
/** Sign-off summary of a setup (the latest decision; `history` only on the detail). */
export interface SignoffSummary {
  state: SignoffState
  expiresOn: string | null
  by: PersonRef | null
  at: string | null
  note: string | null
  /** True when sessions may be logged on the setup today. */
  isValid: boolean
}

export interface LaserSetup {
  id: number
  code: string
  name: string
  room: string
  sourceType: 'cw' | 'pulsed' | 'mode_locked'
  wavelengthsNm: number[]
  notes: string | null
  retiredAt: string | null
  pulseDurationFs: number | null
  repRateHz: number | null
  maxAvgPowerMw: number | null
  pulseEnergyUj: number | null
  beamDiameterMm: number | null
  divergenceMrad: number | null
  harmonicOrders: number[]
  laserClass: LaserClass | null
  eyewear: EyewearEntry[]
  interlocks: string | null
  controlledAreaNotes: string | null
  submitter: PersonRef | null
  /** When its author submitted it for sign-off; null while it is a draft (again after a rejection or revocation). */
  submittedAt: string | null
  signoff: SignoffSummary
}

/** Whether the signed-in person may approve (or renew) a setup, and if not, why (detail only). */
export interface ApprovalCheck {
  canApprove: boolean
  /** Plain-language reason when not; null when they may. */
  reason: string | null
  /** Active safety officers who could approve it (not its author, not a hazard editor since the last decision). */
  eligibleOfficers: number
}

export interface SessionResult {
  arrayId: number
  arrayCode: string
  harmonicPowerW: number | null
  observedNormal: 'not_checked' | 'none' | 'present' | 'co' | 'counter' | 'linear'
  observedM: number[]
  notes: string | null
  /** Engine prediction for this session's pump and order on this array. */
  predicted: ChannelResponse
  /** Plain-language contradictions between observed and predicted (empty: consistent). */
  flags: string[]
}
export interface MeasurementSession {
  id: number
  code: string
  laserSetup: { id: number; code: string; name: string }
  operator: PersonRef
  performedAt: string
  wavelengthNm: number
  pulseDurationFs: number | null
  repRateHz: number | null
  avgPowerMw: number
  spotDiameterUm: number | null
  objectiveNa: number | null
  pump: PumpSpec
  harmonicOrder: number
  geometry: 'transmission' | 'reflection'
  collection: 'normal' | 'angle_resolved'
  analyser: string | null
  detector: string | null
  integrationS: number | null
  filters: string | null
  notes: string | null
  results: SessionResult[]
  /** Derived per result: η = P_N / P_pump (average powers) and P_2 / P_pump² (W⁻¹, order 2 only). */
  derived: { arrayId: number; efficiency: number | null; normalisedW: number | null }[]
  fileCount: number
  createdAt: string
  /** Contemporaneous-record check: entry time (createdAt) vs activity time (performedAt). */
  updatedAt: string
  /** performedAt is more than 24 h before the entry was made. */
  isBackdated: boolean
  /** Session-level notes in plain language (e.g. the back-dated entry). */
  flags: string[]
}
/** One row of the session list (no predictions; open the detail for predicted vs observed). */
export interface MeasurementSessionRow {
  id: number
  code: string
  laserSetup: { id: number; code: string; name: string }
  operator: PersonRef
  performedAt: string
  wavelengthNm: number
  harmonicOrder: number
  pump: PumpSpec
  avgPowerMw: number
  arrayCodes: string[]
  isBackdated: boolean
  createdAt: string
}

export interface StoredFile {
  id: number
  sha256: string
  originalName: string
  mime: string
  sizeBytes: number
  kind: 'sem' | 'spectrum' | 'sweep' | 'camera' | 'other'
  entity: string
  entityId: number
  uploadedBy: PersonRef
  uploadedAt: string
  hasPreview: boolean
}

/** What `/api/resolve/<code>` answers: the record behind a scanned or typed code. */
export interface ResolvedCode {
  kind: 'wafer' | 'chip' | 'array' | 'location' | 'session' | 'laser_setup'
  id: number
  code: string
  to: string
  label: string
}

export type { Role }
