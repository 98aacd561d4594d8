// The part of autocannon 8's API the scripts use (the package ships no type declarations).
declare module 'autocannon' {
  interface Histogram { average: number, p50: number, p99: number, max: number }
  interface Result { requests: Histogram, latency: Histogram, non2xx: number, errors: number, timeouts: number }
  interface Options { url: string, connections?: number, duration?: number, headers?: Record<string, string> }
  function autocannon(options: Options): Promise<Result>
  export default autocannon
}
