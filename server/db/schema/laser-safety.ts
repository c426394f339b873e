import { mysqlTable, int, varchar, json, datetime, date, mysqlEnum, index, double, text } from 'drizzle-orm/mysql-core'
import { sql } from 'drizzle-orm'
import { created, updated, retired } from './columns'
import { users } from './users'
import type { EyewearEntry } from '../../../shared/records'

/**
 * Laser setups (the register) and their sign-off decisions.
 */

export const laserSetups = mysqlTable('laser_setups', {
  id: int('id').autoincrement().primaryKey(),
  code: varchar('code', { length: 20 }).notNull().unique(),
  name: varchar('name', { length: 80 }).notNull(),
  room: varchar('room', { length: 40 }).notNull(),
  sourceType: mysqlEnum('source_type', ['cw', 'pulsed', 'mode_locked']).notNull(),
  wavelengthsNm: json('wavelengths_nm').$type<number[]>().notNull(),
  notes: text('notes'),
  // Hazard fields (issue 5): any change to these voids a sign-off.
  pulseDurationFs: double('pulse_duration_fs'),
  repRateHz: double('rep_rate_hz'),
  maxAvgPowerMw: double('max_avg_power_mw'),
  pulseEnergyUj: double('pulse_energy_uj'),
  beamDiameterMm: double('beam_diameter_mm'),
  divergenceMrad: double('divergence_mrad'),
  harmonicOrders: json('harmonic_orders').$type<number[]>(),
  laserClass: mysqlEnum('laser_class', ['1', '1M', '2', '2M', '3R', '3B', '4']),
  eyewear: json('eyewear').$type<EyewearEntry[]>(),
  interlocks: text('interlocks'),
  controlledAreaNotes: text('controlled_area_notes'),
  /** Who described the setup: the signed-in person who created it, set by the server (never approves it). */
  submittedById: int('submitted_by_id').references(() => users.id, { onDelete: 'restrict' }),
  /**
   * When its author submitted it for sign-off; null while it is a draft (and again after a rejection or revocation).
   */
  submittedAt: datetime('submitted_at', { mode: 'date', fsp: 3 }),
  retiredAt: retired(),
  createdAt: created(),
  updatedAt: updated(),
})

/**
 * Sign-off decisions on laser setups, append-only: the latest row is the current state. `hazardHash`
 * is the SHA-256 of the setup's hazard fields at decision time (an approval binds to that version).
 */
export const laserSetupSignoffs = mysqlTable(
  'laser_setup_signoffs',
  {
    id: int('id').autoincrement().primaryKey(),
    setupId: int('setup_id')
      .notNull()
      .references(() => laserSetups.id, { onDelete: 'restrict' }),
    decision: mysqlEnum('decision', ['approved', 'rejected', 'revoked', 'voided']).notNull(),
    byId: int('by_id')
      .notNull()
      .references(() => users.id, { onDelete: 'restrict' }),
    at: datetime('at', { mode: 'date', fsp: 3 })
      .notNull()
      .default(sql`CURRENT_TIMESTAMP(3)`),
    expiresOn: date('expires_on', { mode: 'string' }),
    note: text('note'),
    hazardHash: varchar('hazard_hash', { length: 64 }).notNull(),
  },
  (t) => [index('signoffs_setup_idx').on(t.setupId, t.id)],
)
