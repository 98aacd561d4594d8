// `npm run services:start` / `services:stop`: the local services for development, left running until stopped.
import { loadConfig } from './lib/config'
import { UserFacingError } from './lib/process'
import { developmentServices, startServices, stopServices } from './lib/services'

const cfg = loadConfig()
const action = process.argv[2]

try {
  if (action === 'start') {
    await startServices(cfg, developmentServices)
    console.log(`MariaDB on 127.0.0.1:${cfg.db.port}, mail inbox on http://127.0.0.1:${cfg.mail.webPort}, payments fake on http://127.0.0.1:${cfg.payments.port}`)
  }
  else if (action === 'stop') {
    await stopServices(cfg, developmentServices)
    console.log('services stopped')
  }
  else {
    console.error('usage: tsx scripts/services.ts start|stop')
    process.exit(2)
  }
}
catch (err) {
  console.error(err instanceof UserFacingError ? err.message : err)
  process.exit(1)
}
