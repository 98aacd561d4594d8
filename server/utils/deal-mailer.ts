import { createTransport, type Transporter } from 'nodemailer'
import type { OutgoingMail } from '../services/outbox'

let transport: Transporter | undefined

/** Sends one outbox mail over SMTP (the local catcher in development and tests). */
export async function sendOutboxMail(mail: OutgoingMail): Promise<void> {
  const c = useRuntimeConfig()
  transport ??= createTransport({ host: c.smtpHost, port: Number(c.smtpPort), secure: false, ignoreTLS: true, connectionTimeout: 5000, greetingTimeout: 5000 })
  await transport.sendMail({ from: c.mailFrom, to: mail.to, subject: mail.subject, text: mail.text, html: mail.html })
}
