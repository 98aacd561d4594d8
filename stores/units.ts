import { defineStore } from 'pinia'
import { UNIT_SYSTEMS, type UnitSystem } from '#shared/units/systems'

export const UNITS_STORAGE_KEY = 'torquewright.units'

export const isUnitSystem = (value: unknown): value is UnitSystem => UNIT_SYSTEMS.includes(value as UnitSystem)

/**
 * The viewer's unit system (imperial or metric). Signed-in users keep it on their profile
 * (PATCH /api/me); anonymous visitors keep it in this browser's localStorage.
 */
export const useUnitsStore = defineStore('units', () => {
  const system = ref<UnitSystem>('imperial')
  const saving = ref(false)
  const error = ref('')

  /** Takes a preference that is already stored somewhere (the profile, localStorage). */
  function adopt(value: UnitSystem) {
    system.value = value
  }

  /** The viewer picks a system: shown at once, then saved where this viewer's preference lives. */
  async function choose(value: UnitSystem, signedIn: boolean) {
    const previous = system.value
    system.value = value
    error.value = ''
    if (!signedIn) {
      if (import.meta.client) localStorage.setItem(UNITS_STORAGE_KEY, value)
      return
    }
    saving.value = true
    try {
      await $fetch('/api/me', { method: 'PATCH', body: { unitPreference: value } })
    }
    catch {
      system.value = previous
      error.value = 'Your unit choice could not be saved: try again.'
    }
    finally {
      saving.value = false
    }
  }

  return { system, saving, error, adopt, choose }
})
