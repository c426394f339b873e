import {
  mysqlTable,
  int,
  varchar,
  json,
  datetime,
  mysqlEnum,
  index,
  double,
  text,
  primaryKey,
} from 'drizzle-orm/mysql-core'
import { created, updated } from './columns'
import { users } from './users'
import { arrays } from './inventory'
import { laserSetups } from './laser-safety'
import type { PumpSpec } from '../../../shared/engine'

/**
 * Measurement sessions and their per-array results.
 */

export const measurementSessions = mysqlTable(
  'measurement_sessions',
  {
    id: int('id').autoincrement().primaryKey(),
    code: varchar('code', { length: 20 }).notNull().unique(),
    laserSetupId: int('laser_setup_id')
      .notNull()
      .references(() => laserSetups.id, { onDelete: 'restrict' }),
    operatorId: int('operator_id')
      .notNull()
      .references(() => users.id, { onDelete: 'restrict' }),
    performedAt: datetime('performed_at', { mode: 'date', fsp: 3 }).notNull(),
    wavelengthNm: double('wavelength_nm').notNull(),
    pulseDurationFs: double('pulse_duration_fs'),
    repRateHz: double('rep_rate_hz'),
    avgPowerMw: double('avg_power_mw').notNull(),
    spotDiameterUm: double('spot_diameter_um'),
    objectiveNa: double('objective_na'),
    pump: json('pump').$type<PumpSpec>().notNull(),
    harmonicOrder: int('harmonic_order').notNull(),
    geometry: mysqlEnum('geometry', ['transmission', 'reflection']).notNull(),
    collection: mysqlEnum('collection', ['normal', 'angle_resolved']).notNull(),
    analyser: varchar('analyser', { length: 60 }),
    detector: varchar('detector', { length: 120 }),
    integrationS: double('integration_s'),
    filters: varchar('filters', { length: 300 }),
    notes: text('notes'),
    createdAt: created(),
    updatedAt: updated(),
  },
  (t) => [
    index('sessions_performed_idx').on(t.performedAt),
    index('sessions_setup_idx').on(t.laserSetupId),
    // the Overview's "my recent sessions": one operator's sessions newest first, without a sort
    index('sessions_operator_performed_idx').on(t.operatorId, t.performedAt),
  ],
)

export const sessionResults = mysqlTable(
  'session_results',
  {
    sessionId: int('session_id')
      .notNull()
      .references(() => measurementSessions.id, { onDelete: 'restrict' }),
    arrayId: int('array_id')
      .notNull()
      .references(() => arrays.id, { onDelete: 'restrict' }),
    harmonicPowerW: double('harmonic_power_w'),
    observedNormal: mysqlEnum('observed_normal', ['not_checked', 'none', 'present', 'co', 'counter', 'linear'])
      .notNull()
      .default('not_checked'),
    observedM: json('observed_m').$type<number[]>().notNull(),
    notes: varchar('notes', { length: 1000 }),
  },
  (t) => [primaryKey({ columns: [t.sessionId, t.arrayId] }), index('session_results_array_idx').on(t.arrayId)],
)
