/** Words and colours of record statuses (wafers, chips) and location kinds. */
const LABELS: Record<string, string> = {
  in_stock: 'In stock',
  in_process: 'In process',
  measured: 'Measured',
  used_up: 'Used up',
  retired: 'Retired',
  room: 'Room',
  cabinet: 'Cabinet',
  box: 'Box',
  slot: 'Slot',
  stale: 'Stale',
  resist: 'Resist',
  exposure: 'Exposure',
  etch: 'Etch',
  deposition: 'Deposition',
  lift_off: 'Lift-off',
  inspection: 'Inspection',
  other: 'Other',
}
const COLORS: Record<string, string> = {
  in_stock: 'positive',
  in_process: 'info',
  measured: 'secondary',
  used_up: 'grey-7',
  retired: 'negative',
  stale: 'warning',
}

export const statusLabel = (s: string): string => LABELS[s] ?? s.replace(/_/g, ' ')
export const statusColor = (s: string): string => COLORS[s] ?? 'secondary'
