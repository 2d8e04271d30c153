import { SMTPServer } from 'smtp-server'
import { simpleParser } from 'mailparser'
import type { Db } from '../db/client.ts'
import { outboxMessages } from '../db/schema.ts'
import { logger } from './logger.ts'

/**
 * A local SMTP server on loopback that stores every message it receives in outbox_messages,
 * so that site admins (Outbox screen) and tests can read what the product sent.
 */
export async function startMailCatcher(db: Db, port = 0): Promise<{ url: string; close: () => Promise<void> }> {
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS', 'AUTH'],
    banner: 'Ratiograph mail catcher',
    size: 5 * 1024 * 1024,
    onData(stream, session, callback) {
      simpleParser(stream)
        .then(async (mail) => {
          const to = session.envelope.rcptTo.map((r) => r.address).join(', ')
          await db.insert(outboxMessages).values({
            toAddress: to,
            fromAddress: session.envelope.mailFrom ? session.envelope.mailFrom.address : '',
            subject: mail.subject ?? '',
            text: mail.text ?? '',
            html: typeof mail.html === 'string' ? mail.html : null,
          })
          callback()
        })
        .catch((err) => { logger.error({ err }, 'mail catcher could not store a message'); callback(err) })
    },
  })
  server.on('error', (err) => logger.error({ err }, 'mail catcher error'))
  await new Promise<void>((ok, fail) => { server.once('error', fail); server.listen(port, '127.0.0.1', () => ok()) })
  const addr = server.server.address()
  const actual = typeof addr === 'object' && addr ? addr.port : port
  return { url: `smtp://127.0.0.1:${actual}`, close: () => new Promise((ok) => server.close(() => ok())) }
}
