import type { ThreadMessageView } from '#shared/types/deals'

/** How often an open thread asks for new messages; well inside the 5 seconds the product promises. */
export const THREAD_POLL_MS = 2000

/**
 * The messages of a thread, kept fresh by polling while the page is open (and visible). Each poll
 * also tells the server the reader is on the page, so no e-mail is sent for what they can see.
 */
export function useThread(requestId: MaybeRefOrGetter<number>) {
  const messages = ref<ThreadMessageView[]>([])
  const lastId = ref(0)
  const failed = ref(false)
  let timer: ReturnType<typeof setTimeout> | undefined
  let stopped = false

  async function poll() {
    try {
      const url: string = `/api/requests/${toValue(requestId)}/messages`
      const res = await $fetch<{ messages: ThreadMessageView[], lastId: number }>(url, { query: { after: lastId.value } })
      const known = new Set(messages.value.map(m => m.id))
      messages.value.push(...res.messages.filter(m => !known.has(m.id)))
      lastId.value = Math.max(lastId.value, res.lastId)
      failed.value = false
    }
    catch {
      failed.value = true
    }
  }

  function schedule() {
    if (stopped) return
    timer = setTimeout(async () => {
      if (document.visibilityState !== 'hidden') await poll()
      schedule()
    }, THREAD_POLL_MS)
  }

  function added(message: ThreadMessageView) {
    if (!messages.value.some(m => m.id === message.id)) messages.value.push(message)
    lastId.value = Math.max(lastId.value, message.id)
  }

  onMounted(async () => {
    await poll()
    schedule()
  })
  onBeforeUnmount(() => {
    stopped = true
    clearTimeout(timer)
  })
  return { messages, failed, added, refresh: poll }
}
