// The part of autocannon's API the page benchmark uses (the package ships no types).
declare module 'autocannon' {
  interface Histogram { average: number, p50: number, p99: number }
  interface Result { requests: Histogram, latency: Histogram, errors: number, timeouts: number, non2xx: number }
  export default function autocannon(opts: { url: string, connections?: number, duration?: number }): Promise<Result>
}
