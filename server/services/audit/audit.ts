import { auditLog, type AuditChanges } from '../../db/schema/index'
import type { DbOrTx } from '../../db/client'

export interface AuditEntry {
  userId: number | null
  entity: string
  entityId: number
  action: 'create' | 'update' | 'retire' | 'signoff' | 'revoke' | 'login' | 'other'
  changes: AuditChanges
  reason?: string | null
}

/** Append one audit row; call inside the same transaction as the change it records. */
export async function writeAudit(tx: DbOrTx, entry: AuditEntry): Promise<void> {
  await tx.insert(auditLog).values({ ...entry, reason: entry.reason ?? null })
}

/** Field-level diff of the keys in `next` that differ from `prev` (JSON comparison). */
export function diffFields(prev: Record<string, unknown>, next: Record<string, unknown>): AuditChanges {
  const changes: AuditChanges = {}
  for (const [key, to] of Object.entries(next)) {
    if (to === undefined) continue
    const from = prev[key]
    if (JSON.stringify(from) !== JSON.stringify(to)) changes[key] = { from, to }
  }
  return changes
}
