/** Runs one action at a time for a button or form, with its pending state and error message. */
export function useAction() {
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
      error.value = apiErrorMessage(e, 'Something went wrong; try again.')
      return undefined
    }
    finally {
      pending.value = false
    }
  }
  return { pending, error, run }
}

/** POSTs JSON to an API route. The address is a plain string, so the typed-routes inference stays shallow. */
export function postJson<T = unknown>(url: string, body?: unknown): Promise<T> {
  return $fetch<T>(url, { method: 'POST', body: body as Record<string, unknown> | undefined }) as unknown as Promise<T>
}
