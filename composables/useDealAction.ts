/** The message a failed API call carries for a person (the route's own wording), or a plain fallback. */
export function dealErrorMessage(error: unknown): string {
  const e = error as { data?: { message?: string }, statusMessage?: string, message?: string }
  return e?.data?.message ?? e?.statusMessage ?? e?.message ?? 'Something went wrong; try again.'
}

/** Runs one action at a time for a button or form, with its pending state and error message. */
export function useDealAction() {
  const pending = ref(false)
  const error = ref<string | null>(null)
  async function run<T>(fn: () => Promise<T>): Promise<T | undefined> {
    if (pending.value) return undefined
    pending.value = true
    error.value = null
    try {
      return await fn()
    }
    catch (e) {
      error.value = dealErrorMessage(e)
      return undefined
    }
    finally {
      pending.value = false
    }
  }
  return { pending, error, run }
}

/** POSTs JSON to a deal route. The address is a plain string, so the typed-routes inference stays shallow. */
export function dealPost<T = unknown>(url: string, body?: unknown): Promise<T> {
  return $fetch<T>(url, { method: 'POST', body: body as Record<string, unknown> | undefined }) as unknown as Promise<T>
}
