import {
  mysqlTable,
  int,
  varchar,
  json,
  datetime,
  date,
  mysqlEnum,
  index,
  uniqueIndex,
  double,
  text,
} from 'drizzle-orm/mysql-core'
import { sql } from 'drizzle-orm'
import { created, updated, retired } from './columns'
import { users } from './users'
import type { Coefficient, StoredChannel } from '../../../shared/records'

/**
 * Inventory: materials, storage locations, wafers, chips, moves, fab steps, computed channel sets and
 * nanostructure arrays. Lab records are never deleted: `retired_at` (with a reason in the audit log)
 * retires them. Every record kind with a label has a unique short `code`.
 */

export const materials = mysqlTable('materials', {
  id: int('id').autoincrement().primaryKey(),
  name: varchar('name', { length: 80 }).notNull().unique(),
  formula: varchar('formula', { length: 40 }).notNull(),
  pointGroup: varchar('point_group', { length: 8 }).notNull(),
  bandGapEv: double('band_gap_ev'),
  transparencyNote: varchar('transparency_note', { length: 300 }),
  notes: text('notes'),
  coefficients: json('coefficients').$type<Coefficient[]>().notNull(),
  retiredAt: retired(),
  createdAt: created(),
  updatedAt: updated(),
})

export const locations = mysqlTable(
  'locations',
  {
    id: int('id').autoincrement().primaryKey(),
    code: varchar('code', { length: 20 }).notNull().unique(),
    kind: mysqlEnum('kind', ['room', 'cabinet', 'box', 'slot']).notNull(),
    name: varchar('name', { length: 80 }).notNull(),
    parentId: int('parent_id'),
    notes: varchar('notes', { length: 500 }),
    retiredAt: retired(),
    createdAt: created(),
  },
  (t) => [index('locations_parent_idx').on(t.parentId)],
)

export const wafers = mysqlTable(
  'wafers',
  {
    id: int('id').autoincrement().primaryKey(),
    code: varchar('code', { length: 20 }).notNull().unique(),
    materialId: int('material_id')
      .notNull()
      .references(() => materials.id, { onDelete: 'restrict' }),
    cutNormal: json('cut_normal').$type<[number, number, number]>().notNull(),
    flatDirection: json('flat_direction').$type<[number, number, number]>().notNull(),
    diameterMm: double('diameter_mm').notNull(),
    thicknessUm: double('thickness_um').notNull(),
    lot: varchar('lot', { length: 60 }).notNull(),
    supplier: varchar('supplier', { length: 120 }),
    receivedOn: date('received_on', { mode: 'string' }),
    locationId: int('location_id').references(() => locations.id, { onDelete: 'restrict' }),
    status: mysqlEnum('status', ['in_stock', 'in_process', 'used_up', 'retired']).notNull().default('in_stock'),
    notes: text('notes'),
    createdBy: int('created_by')
      .notNull()
      .references(() => users.id, { onDelete: 'restrict' }),
    createdAt: created(),
    updatedAt: updated(),
  },
  (t) => [
    index('wafers_material_idx').on(t.materialId),
    index('wafers_status_idx').on(t.status),
    index('wafers_lot_idx').on(t.lot),
  ],
)

export const chips = mysqlTable(
  'chips',
  {
    id: int('id').autoincrement().primaryKey(),
    code: varchar('code', { length: 24 }).notNull().unique(),
    waferId: int('wafer_id')
      .notNull()
      .references(() => wafers.id, { onDelete: 'restrict' }),
    /** 1-based number within the wafer (the last part of the code). */
    index: int('chip_index').notNull(),
    rotationDeg: double('rotation_deg').notNull().default(0),
    widthMm: double('width_mm').notNull(),
    heightMm: double('height_mm').notNull(),
    locationId: int('location_id').references(() => locations.id, { onDelete: 'restrict' }),
    holderId: int('holder_id').references(() => users.id, { onDelete: 'restrict' }),
    status: mysqlEnum('status', ['in_stock', 'in_process', 'measured', 'used_up', 'retired'])
      .notNull()
      .default('in_stock'),
    notes: text('notes'),
    createdAt: created(),
    updatedAt: updated(),
  },
  (t) => [
    uniqueIndex('chips_wafer_index_uq').on(t.waferId, t.index),
    index('chips_status_idx').on(t.status),
    index('chips_location_idx').on(t.locationId),
    index('chips_status_code_idx').on(t.status, t.code),
  ],
)

export const moves = mysqlTable(
  'moves',
  {
    id: int('id').autoincrement().primaryKey(),
    itemKind: mysqlEnum('item_kind', ['wafer', 'chip', 'location']).notNull(),
    itemId: int('item_id').notNull(),
    itemCode: varchar('item_code', { length: 24 }).notNull(),
    fromLocationId: int('from_location_id').references(() => locations.id, { onDelete: 'restrict' }),
    toLocationId: int('to_location_id').references(() => locations.id, { onDelete: 'restrict' }),
    handedToId: int('handed_to_id').references(() => users.id, { onDelete: 'restrict' }),
    movedBy: int('moved_by')
      .notNull()
      .references(() => users.id, { onDelete: 'restrict' }),
    movedAt: datetime('moved_at', { mode: 'date', fsp: 3 })
      .notNull()
      .default(sql`CURRENT_TIMESTAMP(3)`),
    note: varchar('note', { length: 500 }),
  },
  (t) => [index('moves_item_idx').on(t.itemKind, t.itemId), index('moves_to_idx').on(t.toLocationId)],
)

export const fabSteps = mysqlTable(
  'fab_steps',
  {
    id: int('id').autoincrement().primaryKey(),
    chipId: int('chip_id')
      .notNull()
      .references(() => chips.id, { onDelete: 'restrict' }),
    kind: mysqlEnum('kind', ['resist', 'exposure', 'etch', 'deposition', 'lift_off', 'inspection', 'other']).notNull(),
    params: json('params').$type<Record<string, string | number>>().notNull(),
    operatorId: int('operator_id')
      .notNull()
      .references(() => users.id, { onDelete: 'restrict' }),
    performedAt: datetime('performed_at', { mode: 'date', fsp: 3 }).notNull(),
    notes: text('notes'),
    createdAt: created(),
  },
  (t) => [
    index('fab_steps_chip_idx').on(t.chipId, t.performedAt),
    // the Overview's recent steps of the whole lab, newest first (services/home/overview.ts)
    index('fab_steps_performed_idx').on(t.performedAt),
  ],
)

/**
 * Computed channel sets, stored once per distinct content: the key is the SHA-256 of the channels'
 * JSON, so the thousands of arrays of one design on one wafer share one row, and a row never
 * changes (a recompute with a new result makes a new row and repoints the array).
 */
export const channelSets = mysqlTable('channel_sets', {
  key: varchar('set_key', { length: 64 }).primaryKey(),
  channels: json('channels').$type<StoredChannel[]>().notNull(),
  engineVersion: varchar('engine_version', { length: 20 }).notNull(),
  createdAt: created(),
})

export const arrays = mysqlTable(
  'arrays',
  {
    id: int('id').autoincrement().primaryKey(),
    code: varchar('code', { length: 32 }).notNull().unique(),
    chipId: int('chip_id')
      .notNull()
      .references(() => chips.id, { onDelete: 'restrict' }),
    position: varchar('position', { length: 6 }).notNull(),
    shape: varchar('shape', { length: 20 }).notNull(),
    dimensionsNm: json('dimensions_nm').$type<Record<string, number>>().notNull(),
    shapeAzimuthDeg: double('shape_azimuth_deg').notNull().default(0),
    lattice: varchar('lattice', { length: 20 }).notNull(),
    periodXNm: double('period_x_nm'),
    periodYNm: double('period_y_nm'),
    azimuthDeg: double('azimuth_deg').notNull().default(0),
    count: int('count').notNull().default(1),
    customRotationOrder: int('custom_rotation_order'),
    customMirrors: json('custom_mirrors').$type<number[] | null>(),
    /** Derived on every save: structure group name (e.g. C4v) and the key of the stored channel set. */
    symmetryName: varchar('symmetry_name', { length: 12 }),
    channelSetKey: varchar('channel_set_key', { length: 64 }).references(() => channelSets.key, {
      onDelete: 'restrict',
    }),
    engineVersion: varchar('engine_version', { length: 20 }),
    /** Hash of every input the channels depend on (material group, cut, flat, chip rotation, array geometry). */
    channelsInputHash: varchar('channels_input_hash', { length: 64 }),
    channelsComputedAt: datetime('channels_computed_at', { mode: 'date', fsp: 3 }),
    notes: text('notes'),
    retiredAt: retired(),
    createdAt: created(),
    updatedAt: updated(),
  },
  (t) => [
    uniqueIndex('arrays_chip_position_uq').on(t.chipId, t.position),
    index('arrays_engine_idx').on(t.engineVersion),
    // list pages: unretired rows in code order, and the shape + lattice filter in code or period
    // order, read from the index without a sort (bench: see DEVELOPERS.md). The FULLTEXT index on
    // notes is made by hand in migration 0009 (text-search.ts).
    index('arrays_retired_code_idx').on(t.retiredAt, t.code),
    index('arrays_shape_lattice_code_idx').on(t.shape, t.lattice, t.retiredAt, t.code),
    index('arrays_shape_lattice_period_idx').on(t.shape, t.lattice, t.retiredAt, t.periodXNm),
  ],
)
