import { resolve } from 'node:path'
import fsDriver from 'unstorage/drivers/fs'

// Uploaded files live under the data folder; the base comes from runtime config so tests use their own.
export default defineNitroPlugin(() => {
  const base = useRuntimeConfig().uploadsDir || resolve(process.cwd(), '.data', 'uploads')
  useStorage().mount('uploads', fsDriver({ base }))
})
