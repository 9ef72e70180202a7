import type { AddressInfo } from 'node:net'
import { simpleParser } from 'mailparser'
import { SMTPServer } from 'smtp-server'

import type { CaughtMailDto as CaughtMail } from '@shared/schemas/audit.schema'

export type { CaughtMail }

/** What the caught-mail page reads: the catcher itself, or (in an HTTP worker) the primary's. */
export interface Mailbox {
  list(): Promise<CaughtMail[]>
}

export interface MailCatcher extends Mailbox {
  url: string
  messages: CaughtMail[]
  stop(): Promise<void>
}

const KEEP = 500

/** A local SMTP server that keeps what it receives in memory, for demo mode and tests. */
export async function startMailCatcher(): Promise<MailCatcher> {
  const messages: CaughtMail[] = []
  let next = 1
  const server = new SMTPServer({
    authOptional: true,
    // Its built-in certificate has expired; on loopback there is nothing to encrypt against.
    disabledCommands: ['STARTTLS', 'AUTH'],
    logger: false,
    // A reverse DNS lookup of 127.0.0.1 on every connection cost ~0.1 s a message, more without DNS.
    disableReverseLookup: true,
    size: 5 * 1024 * 1024,
    onData(stream, session, callback) {
      simpleParser(stream).then((parsed) => {
        messages.unshift({
          id: next++,
          to: session.envelope.rcptTo.map((r) => r.address),
          from: session.envelope.mailFrom ? session.envelope.mailFrom.address : '',
          subject: parsed.subject ?? '',
          text: parsed.text ?? '',
          receivedAt: new Date().toISOString(),
        })
        messages.splice(KEEP)
        callback()
      }, callback)
    },
  })
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve))
  const { port } = server.server.address() as AddressInfo
  return {
    url: `smtp://127.0.0.1:${port}?ignoreTLS=true`,
    messages,
    list: () => Promise.resolve(messages),
    stop: () => new Promise<void>((resolve) => server.close(() => resolve())),
  }
}
