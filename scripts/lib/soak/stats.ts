/** What one request of the load produced, kept for the phase's figures. */
export interface Sample {
  kind: string
  /** Milliseconds since the phase began, when the request was sent and when it was answered. */
  sentAt: number
  doneAt: number
  ms: number
  status: number
  error: string | null
}

export interface LatencySummary {
  count: number
  p50: number
  p99: number
  max: number
}

/** Nearest-rank percentile of sorted values. */
export function percentile(sorted: number[], p: number): number {
  if (sorted.length === 0) return Number.NaN
  return sorted[Math.min(sorted.length - 1, Math.max(0, Math.ceil(p * sorted.length) - 1))]!
}

export function latency(samples: Sample[]): LatencySummary {
  const ms = samples.map(s => s.ms).sort((a, b) => a - b)
  return { count: ms.length, p50: percentile(ms, 0.5), p99: percentile(ms, 0.99), max: ms.at(-1) ?? Number.NaN }
}

export const ok = (s: Sample) => s.status >= 200 && s.status < 300

/** Counts by answer: the status code, or the error when none came ('timeout', 'ECONNRESET', …). */
export function outcomes(samples: Sample[], keep: (s: Sample) => boolean = s => !ok(s)): Record<string, number> {
  const out: Record<string, number> = {}
  for (const s of samples) {
    if (!keep(s)) continue
    const key = s.status ? String(s.status) : (s.error ?? 'error')
    out[key] = (out[key] ?? 0) + 1
  }
  return out
}

export const fmtMs = (ms: number) => (Number.isNaN(ms) ? '—' : ms < 10 ? ms.toFixed(1) : String(Math.round(ms)))
export const fmtCounts = (counts: Record<string, number>) => {
  const entries = Object.entries(counts).sort((a, b) => b[1] - a[1])
  return entries.length ? entries.map(([k, n]) => `${k}×${n}`).join(', ') : 'none'
}

/** The figures of one phase as printed lines: totals, then one line per action kind. */
export function phaseTable(samples: Sample[], seconds: number): string[] {
  const all = latency(samples)
  const failed = samples.filter(s => !ok(s))
  const lines = [
    `  requests ${all.count}, ${(all.count / seconds).toFixed(1)} req/s over ${seconds.toFixed(1)} s; latency p50 ${fmtMs(all.p50)} ms, p99 ${fmtMs(all.p99)} ms, max ${fmtMs(all.max)} ms`,
    `  not 2xx: ${failed.length} (${fmtCounts(outcomes(samples))})`,
  ]
  const kinds = [...new Set(samples.map(s => s.kind))].sort()
  const width = Math.max(...kinds.map(k => k.length), 4)
  lines.push(`    ${'kind'.padEnd(width)}  ${'count'.padStart(6)}  ${'p50 ms'.padStart(7)}  ${'p99 ms'.padStart(7)}  not 2xx`)
  for (const kind of kinds) {
    const of = samples.filter(s => s.kind === kind)
    const l = latency(of)
    lines.push(`    ${kind.padEnd(width)}  ${String(l.count).padStart(6)}  ${fmtMs(l.p50).padStart(7)}  ${fmtMs(l.p99).padStart(7)}  ${fmtCounts(outcomes(of))}`)
  }
  return lines
}
