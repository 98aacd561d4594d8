import { resolve } from 'node:path'
import fsDriver from 'unstorage/drivers/fs'
import { mariadbStorage } from '../utils/mariadb-storage'

// Uploaded files live under the data folder (or a folder every instance mounts), or, with
// NUXT_UPLOADS_DRIVER=mariadb, as rows in MariaDB that a Galera cluster replicates; the base comes
// from runtime config so tests use their own.
export default defineNitroPlugin(() => {
  const config = useRuntimeConfig()
  if (config.uploadsDriver === 'mariadb') {
    useStorage().mount('uploads', mariadbStorage({ db: useDb }))
    return
  }
  if (config.uploadsDriver && config.uploadsDriver !== 'fs') throw new Error(`NUXT_UPLOADS_DRIVER must be "fs" or "mariadb", not "${config.uploadsDriver}".`)
  const base = config.uploadsDir || resolve(process.cwd(), '.data', 'uploads')
  useStorage().mount('uploads', fsDriver({ base }))
})
