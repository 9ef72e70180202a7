import nodemailer, { type Transporter } from 'nodemailer'
import type { Logger } from '../../logger'

export interface OutgoingMail {
  to: string
  subject: string
  text: string
}

export interface Mailer {
  send(mail: OutgoingMail): Promise<void>
}

/** Mail through SMTP (the local catcher in demo mode). Sending never fails the request that caused it. */
export function createMailer(smtpUrl: string, from: string, logger: Logger): Mailer {
  const transport: Transporter = nodemailer.createTransport(smtpUrl)
  return {
    async send(mail) {
      try {
        await transport.sendMail({ from, ...mail })
      } catch (err) {
        logger.error({ err, to: mail.to, subject: mail.subject }, 'mail not sent')
      }
    },
  }
}

/** Mail through SMTP when there is a server to send to; otherwise each message is only logged. */
export function mailerOrLog(smtpUrl: string | null, from: string, logger: Logger): Mailer {
  if (smtpUrl) return createMailer(smtpUrl, from, logger)
  return {
    send: async (m) => logger.info({ to: m.to, subject: m.subject }, 'mail not sent: no SMTP_URL'),
  }
}
