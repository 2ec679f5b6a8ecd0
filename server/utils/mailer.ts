import nodemailer from 'nodemailer'
import type { SendMailOptions, Transporter } from 'nodemailer'
import type SMTPTransport from 'nodemailer/lib/smtp-transport'

/**
 * The only place that talks SMTP. Everything else queues mail with `enqueueMail()` and lets
 * `flushOutbox()` (the mail:flush task) send it through here.
 *
 * SMTP_HOST (127.0.0.1), SMTP_PORT (2525: the local catcher), SMTP_SECURE=1 for TLS from the
 * first byte (port 465), SMTP_USER/SMTP_PASS when the server wants a sign-in, MAIL_FROM.
 */
let transport: Transporter<SMTPTransport.SentMessageInfo, SMTPTransport.Options> | undefined

const LOOPBACK = new Set(['127.0.0.1', 'localhost', '::1'])

function createTransport(): Transporter<SMTPTransport.SentMessageInfo, SMTPTransport.Options> {
  const host = process.env.SMTP_HOST || '127.0.0.1'
  const port = Number(process.env.SMTP_PORT || 2525)
  const secure = process.env.SMTP_SECURE === '1'
  const user = process.env.SMTP_USER
  return nodemailer.createTransport({
    host,
    port,
    secure,
    // The local catcher speaks plain SMTP on loopback only; elsewhere STARTTLS is used when offered.
    ignoreTLS: !secure && LOOPBACK.has(host),
    auth: user ? { user, pass: process.env.SMTP_PASS || '' } : undefined,
    // Fail fast so one unreachable server cannot hold a flush for minutes.
    connectionTimeout: 10_000,
    greetingTimeout: 10_000,
    socketTimeout: 30_000,
  })
}

/** The From address of every message. */
export function mailFrom(): string {
  return process.env.MAIL_FROM || '"Rillbook" <no-reply@rillbook.example>'
}

/** Sends one message through the cached transport; rejects when the server refuses or is unreachable. */
export async function sendMail(message: SendMailOptions): Promise<SMTPTransport.SentMessageInfo> {
  transport ??= createTransport()
  return transport.sendMail({ from: mailFrom(), ...message })
}
