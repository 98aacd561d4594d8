// Runs the fuzz target in a worker thread with TypeScript loaded by tsx, so the test can stop it if a call hangs.
import { register } from 'tsx/esm/api'

register()
await import(new URL('./target.ts', import.meta.url).href)
