import { isUnitSystem, UNITS_STORAGE_KEY } from '~/stores/units'

/** Sets the unit system from the signed-in user's profile, or (anonymous, in the browser) from localStorage. */
export default defineNuxtPlugin((nuxtApp) => {
  const units = useUnitsStore()
  const user = useSessionUser()
  if (user.value) units.adopt(user.value.units)
  watch(() => user.value?.units, (value) => {
    if (value) units.adopt(value)
  })
  nuxtApp.hook('app:mounted', () => {
    if (user.value) return
    const stored = localStorage.getItem(UNITS_STORAGE_KEY)
    if (isUnitSystem(stored)) units.adopt(stored)
  })
})
