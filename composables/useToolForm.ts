import type { z } from 'zod'
import { computed, reactive, watch } from 'vue'
import { rangeErrorMessage, rewriteValue, type ToolField, type ToolInput, type ToolValues } from '#shared/schemas/tools'
import type { UnitSystem } from '#shared/tools/quantities'
import { useUnitsStore } from '~/stores/units'

export interface ToolFormOptions<K extends string, R> {
  fields: readonly ToolField<K>[]
  /** Starting values, written in imperial units. */
  defaults: ToolValues<K>
  schema: (system: UnitSystem) => z.ZodType<ToolInput<K>, unknown>
  /** The engine-module call; a RangeError it throws becomes a message beside a field. */
  compute: (input: ToolInput<K>) => R
  /** Where a RangeError that names no field is shown. */
  fallbackField: K
}

/**
 * One calculator's state: the typed text of every field, its messages and the module's result,
 * recomputed as the person types and rewritten into the other units when the system changes.
 */
export function useToolForm<K extends string, R>(options: ToolFormOptions<K, R>) {
  const units = useUnitsStore()
  const system = computed(() => units.system)
  const start = {} as ToolValues<K>
  for (const f of options.fields) start[f.key] = rewriteValue(f, options.defaults[f.key], 'imperial', units.system)
  const values = reactive(start) as ToolValues<K>

  watch(system, (next, previous) => {
    for (const f of options.fields) values[f.key] = rewriteValue(f, values[f.key], previous, next)
  })

  const outcome = computed((): { errors: Partial<Record<K, string>>, result: R | null } => {
    const parsed = options.schema(system.value).safeParse({ ...values })
    if (!parsed.success) {
      const errors: Partial<Record<K, string>> = {}
      for (const issue of parsed.error.issues) {
        const key = issue.path[0] as K
        errors[key] ??= issue.message
      }
      return { errors, result: null }
    }
    try {
      return { errors: {}, result: options.compute(parsed.data) }
    }
    catch (error) {
      if (error instanceof RangeError) return { errors: rangeErrorMessage(options.fields, error, options.fallbackField), result: null }
      throw error
    }
  })

  return {
    system,
    values,
    errors: computed(() => outcome.value.errors),
    result: computed(() => outcome.value.result),
  }
}
