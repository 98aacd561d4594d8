import nodemailer, { type Transporter } from 'nodemailer'

export interface OutgoingMail {
  to: string
  subject: string
  text: string
  html?: string
  /** A Message-ID to send under (the outbox gives each row a stable one); nodemailer makes one when absent. */
  messageId?: string
}

let transport: Transporter | undefined

/** The one SMTP transport of the server (the local mail catcher in development and tests). */
function useTransport(): Transporter {
  if (!transport) {
    const { smtpHost, smtpPort } = useRuntimeConfig()
    transport = nodemailer.createTransport({
      host: smtpHost,
      port: Number(smtpPort),
      secure: false,
      ignoreTLS: smtpHost === '127.0.0.1' || smtpHost === 'localhost',
      connectionTimeout: 10_000,
      greetingTimeout: 10_000,
      // Reuses open SMTP connections instead of one per message, so an outbox backlog drains quickly.
      pool: true,
      maxConnections: 3,
    })
  }
  return transport
}

/** Sends one message from the configured sender; rejects when the SMTP server refuses it. Only the outbox's drainer calls it: every mail is queued in the outbox (server/services/outbox.ts). */
export async function sendMail({ to, subject, text, html, messageId }: OutgoingMail): Promise<void> {
  await useTransport().sendMail({ from: useRuntimeConfig().mailFrom, to, subject, text, html, ...(messageId ? { messageId } : {}) })
}
