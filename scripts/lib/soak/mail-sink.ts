import type { AddressInfo } from 'node:net'
import { SMTPServer } from 'smtp-server'

/**
 * An SMTP server on 127.0.0.1 that accepts and counts the app's mail and keeps none of it: the
 * soak needs the outbox to drain, not the messages. Connections the app drops when it stops are
 * expected, so socket errors are counted rather than thrown.
 */
export async function startMailSink(): Promise<{ smtpPort: number, received: () => number, stop: () => Promise<void> }> {
  let received = 0
  const smtp = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS'],
    disableReverseLookup: true,
    logger: false,
    onData(stream, _session, callback) {
      stream.on('end', () => {
        received++
        callback()
      })
      stream.resume()
    },
  })
  smtp.on('error', () => {})
  await new Promise<void>(r => smtp.listen(0, '127.0.0.1', () => r()))
  return {
    smtpPort: (smtp.server.address() as AddressInfo).port,
    received: () => received,
    stop: () => new Promise<void>(r => smtp.close(() => r())),
  }
}
