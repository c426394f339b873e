/** Wavelengths generated from a pump wavelength: order N gives λ/N (vacuum wavelengths, nm). */
export function harmonicsOf(
  wavelengthNm: number,
  orders: readonly number[] = [2, 3],
): { order: number; wavelengthNm: number }[] {
  return orders.map((order) => ({ order, wavelengthNm: Math.round((wavelengthNm / order) * 10) / 10 }))
}

export const SOURCE_TYPES = [
  { value: 'cw', label: 'Continuous wave' },
  { value: 'pulsed', label: 'Pulsed' },
  { value: 'mode_locked', label: 'Mode-locked (ultrafast)' },
] as const

export const sourceTypeLabel = (v: string) => SOURCE_TYPES.find((s) => s.value === v)?.label ?? v
