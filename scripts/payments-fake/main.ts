// Runs the payments fake as its own process (started by scripts/lib/payments.ts for demo and dev).
// Settings come from the environment so no secret appears on a command line.
import { createPaymentsFake } from './server'

function required(name: string): string {
  const value = process.env[name]
  if (!value) {
    console.error(`${name} is not set`)
    process.exit(2)
  }
  return value
}

const fake = await createPaymentsFake({
  port: Number(process.env.TW_PAYMENTS_PORT ?? 12111),
  secretKey: required('TW_PAYMENTS_SECRET_KEY'),
  webhookSecret: required('TW_PAYMENTS_WEBHOOK_SECRET'),
  webhookUrl: process.env.TW_PAYMENTS_WEBHOOK_URL || null,
  stateFile: process.env.TW_PAYMENTS_STATE_FILE || undefined,
  log: line => console.log(`${new Date().toISOString()} ${line}`),
})

const stop = async () => {
  await fake.close()
  process.exit(0)
}
process.once('SIGTERM', stop)
process.once('SIGINT', stop)
