import { defineStore } from 'pinia'
import { buildPatch, partsListSchema, publishProblems, type BuildPatch } from '#shared/schemas/build'
import type { EditorBuild, EditorFields } from '#shared/types/editor'
import type { BuildPartRow } from '#shared/types/builds'

export type SaveState = 'saved' | 'waiting' | 'saving' | 'error'
type FieldKey = keyof EditorFields

/** Quiet time after the last keystroke before an autosave goes out. */
const AUTOSAVE_MS = 700

/**
 * The build in progress in the editor: the values as typed, each checked with the shared schema
 * the server uses, and saved shortly after the shop stops typing (only the fields that changed).
 */
export const useBuildStore = defineStore('build', () => {
  const build = ref<EditorBuild | null>(null)
  const fields = ref<EditorFields | null>(null)
  const parts = ref<BuildPartRow[]>([])
  const errors = ref<Partial<Record<FieldKey | 'parts', string>>>({})
  const saveState = ref<SaveState>('saved')
  const saveError = ref('')
  const savedAt = ref<Date | null>(null)
  let pending: BuildPatch = {}
  let timer: ReturnType<typeof setTimeout> | undefined
  let inflight: Promise<void> | null = null

  const livePulls = computed(() => build.value?.pulls.filter(p => p.status !== 'rejected').length ?? 0)
  /** What publishing still needs, from the same check the server runs. */
  const problems = computed(() => (fields.value ? publishProblems(fields.value as unknown as Record<string, unknown>, livePulls.value) : []))

  function load(next: EditorBuild) {
    build.value = next
    fields.value = { ...next.fields }
    parts.value = next.parts.map(p => ({ ...p }))
    errors.value = {}
    pending = {}
    saveState.value = 'saved'
    saveError.value = ''
  }

  /** Takes a fresh copy from the server (after an upload or a status change) without losing what is being typed. */
  function refreshFrom(next: EditorBuild) {
    build.value = next
    if (!Object.keys(pending).length && saveState.value === 'saved') {
      fields.value = { ...next.fields }
      parts.value = next.parts.map(p => ({ ...p }))
    }
  }

  function schedule() {
    saveState.value = 'waiting'
    clearTimeout(timer)
    timer = setTimeout(() => void flush(), AUTOSAVE_MS)
  }

  function setField<K extends FieldKey>(key: K, value: EditorFields[K]) {
    if (!fields.value) return
    fields.value[key] = value
    const check = buildPatch.shape[key].safeParse(value)
    if (!check.success) {
      errors.value = { ...errors.value, [key]: check.error.issues[0]?.message ?? 'Check this value' }
      return
    }
    const { [key]: _cleared, ...rest } = errors.value
    errors.value = rest
    pending = { ...pending, [key]: check.data }
    schedule()
  }

  /** Marks text that is not yet a value (a number box holding letters); nothing is saved until it reads. */
  function markUnreadable(key: FieldKey | 'parts', message: string) {
    errors.value = { ...errors.value, [key]: message }
  }

  function setParts(rows: BuildPartRow[]) {
    parts.value = rows
    const check = partsListSchema.safeParse(rows.map(({ position: _p, ...row }) => row))
    if (!check.success) {
      const issue = check.error.issues[0]
      const row = typeof issue?.path[0] === 'number' ? `Row ${issue.path[0] + 1}: ` : ''
      errors.value = { ...errors.value, parts: `${row}${issue?.message ?? 'check the parts list'}` }
      return
    }
    const { parts: _cleared, ...rest } = errors.value
    errors.value = rest
    pending = { ...pending, parts: check.data }
    schedule()
  }

  /** Sends what changed now (the timer, leaving the page, and publishing all call it). */
  async function flush(): Promise<boolean> {
    clearTimeout(timer)
    if (inflight) await inflight
    if (!build.value || !Object.keys(pending).length) return saveState.value !== 'error'
    const body = pending
    pending = {}
    saveState.value = 'saving'
    inflight = $fetch<EditorBuild>(`/api/me/builds/${build.value.id}`, { method: 'PATCH', body })
      .then((updated) => {
        build.value = updated
        savedAt.value = new Date()
        saveError.value = ''
        saveState.value = Object.keys(pending).length ? 'waiting' : 'saved'
      })
      .catch((error: { data?: { message?: string } }) => {
        pending = { ...body, ...pending }
        saveError.value = error.data?.message ?? 'The last change could not be saved; it will be tried again with the next one.'
        saveState.value = 'error'
      })
      .finally(() => {
        inflight = null
      })
    await inflight
    return (saveState.value as SaveState) !== 'error'
  }

  return { build, fields, parts, errors, saveState, saveError, savedAt, problems, livePulls, load, refreshFrom, setField, markUnreadable, setParts, flush }
})
