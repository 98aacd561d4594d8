import { defineStore } from 'pinia'
import { ref } from 'vue'
import type { UnitSystem } from '#shared/tools/quantities'

/** The calculators page's unit system (imperial or metric), kept while the visitor moves around the app. */
export const useToolUnitsStore = defineStore('tool-units', () => {
  const system = ref<UnitSystem>('imperial')
  function setSystem(next: UnitSystem) {
    system.value = next
  }
  return { system, setSystem }
})
