import { sql } from 'drizzle-orm'
import { arrays } from '../../db/schema/index'
import { ENGINE_VERSION } from '../../../shared/engine'

/**
 * The one definition of "an array's stored channels are stale", in SQL so that the list, its
 * `stale` filter, the record page, recompute and the Excel export all agree: computed by another
 * engine version, never computed, or an input hash cleared because the wafer's material, cut or
 * flat or the chip's rotation changed (every write path clears it in the same transaction).
 * 1 when stale, 0 when not.
 */
export const staleChannelsSql = sql<number>`(${arrays.engineVersion} IS NULL OR ${arrays.engineVersion} <> ${ENGINE_VERSION} OR ${arrays.channelsInputHash} IS NULL)`
