/**
 * Laser-safety wording shown wherever a laser setup appears (register, session forms and pages).
 * Kept in one place so the server and the client show the same sentence.
 */
export const LASER_CAUTION =
  'Laser radiation can cause permanent eye and skin injury. Figures shown are indicative; the laser safety officer, local regulations and the current standard govern.'

/** Short alias used in API responses (`caution`). */
export const caution = LASER_CAUTION
