import type { ClassRules } from '#shared/schemas/class-rules'

/**
 * The signed-in racer's class rules, fetched once per page view in the browser; null for anyone else
 * or a racer with none saved. `refresh()` after a save.
 */
export function useClassRules() {
  const user = useSessionUser()
  const isRacer = computed(() => user.value?.role === 'racer')
  const { data, refresh, status } = useFetch<{ rules: ClassRules | null }>('/api/me/class', {
    key: 'class-rules',
    server: false,
    lazy: true,
    immediate: isRacer.value,
    watch: [isRacer],
  })
  const rules = computed(() => (isRacer.value ? data.value?.rules ?? null : null))
  return { rules, refresh, status, isRacer }
}
