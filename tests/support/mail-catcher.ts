import { createServer as createHttpServer, type Server } from 'node:http'
import type { AddressInfo } from 'node:net'
import { simpleParser } from 'mailparser'
import { SMTPServer } from 'smtp-server'

export interface CaughtMail {
  to: string[]
  from: string
  subject: string
  text: string
  html: string
  date: string
  /** The Message-ID header as sent, angle brackets included ('' when there was none). */
  messageId: string
}

/** A real SMTP server on 127.0.0.1 that keeps what it receives, with a small HTTP API for the tests to read it. */
export async function startMailCatcher(): Promise<{ smtpPort: number, apiUrl: string, stop: () => Promise<void> }> {
  const inbox: CaughtMail[] = []
  const smtp = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS'],
    disableReverseLookup: true,
    logger: false,
    onData(stream, _session, callback) {
      simpleParser(stream).then((mail) => {
        const addresses = (Array.isArray(mail.to) ? mail.to : mail.to ? [mail.to] : []).flatMap(a => a.value.map(v => (v.address ?? '').toLowerCase()))
        inbox.push({ to: addresses, from: mail.from?.text ?? '', subject: mail.subject ?? '', text: mail.text ?? '', html: typeof mail.html === 'string' ? mail.html : '', date: new Date().toISOString(), messageId: mail.messageId ?? '' })
        callback()
      }, callback)
    },
  })
  // A client that hangs up mid-session (the app killed at teardown) is an SMTP 'error' event: note it, never crash the run.
  smtp.on('error', (error: Error) => console.warn(`mail catcher: ${error.message}`))
  await new Promise<void>(r => smtp.listen(0, '127.0.0.1', () => r()))
  const smtpPort = (smtp.server.address() as AddressInfo).port

  const api: Server = createHttpServer((req, res) => {
    const url = new URL(req.url ?? '/', 'http://127.0.0.1')
    if (req.method === 'DELETE') inbox.length = 0
    const to = url.searchParams.get('to')?.toLowerCase()
    res.setHeader('content-type', 'application/json')
    res.end(JSON.stringify(to ? inbox.filter(m => m.to.includes(to)) : inbox))
  })
  await new Promise<void>(r => api.listen(0, '127.0.0.1', () => r()))
  const apiUrl = `http://127.0.0.1:${(api.address() as AddressInfo).port}`

  return {
    smtpPort,
    apiUrl,
    stop: async () => {
      await new Promise<void>(r => smtp.close(() => r()))
      await new Promise<void>(r => api.close(() => r()))
    },
  }
}
