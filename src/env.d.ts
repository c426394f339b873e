/// <reference types="vite/client" />
import type { AppAbility } from '../shared/abilities'

// Lets vue-tsc type `$can(...)` in templates; the global properties come from
// `abilitiesPlugin(..., { useGlobalProperties: true })` in main.ts.
declare module 'vue' {
  interface ComponentCustomProperties {
    $ability: AppAbility
    $can(this: this, ...args: Parameters<this['$ability']['can']>): boolean
  }
}

export {}
