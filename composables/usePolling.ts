/**
 * Calls `tick` every `ms` while the calling component is mounted (never during server rendering),
 * and stops on unmount or when `stop()` is called.
 */
export function usePolling(tick: () => unknown, ms: number) {
  let timer: ReturnType<typeof setInterval> | undefined
  function stop() {
    clearInterval(timer)
    timer = undefined
  }
  onMounted(() => {
    timer = setInterval(tick, ms)
  })
  onBeforeUnmount(stop)
  return { stop }
}
