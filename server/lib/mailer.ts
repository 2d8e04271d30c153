import nodemailer from 'nodemailer'
import { logger } from './logger.ts'

export interface MailMessage { to: string; subject: string; text: string; html?: string }
export interface Mailer {
  /** Accepts a message; the queued mailer returns before it is delivered. */
  send(message: MailMessage): Promise<void>
  /** Resolves once every accepted message has been delivered or given up on (tests, shutdown). */
  idle?(): Promise<void>
  close(): void
}
export interface QueuedMailer extends Mailer { idle(): Promise<void> }
/** Hands one message to the relay; rejects when the relay refuses or cannot be reached. */
export type Deliver = (message: MailMessage) => Promise<void>

export const MAIL_FROM = 'Ratiograph <no-reply@ratiograph.invalid>'

export interface QueueOptions {
  /** tries per message before it is given up (logged as an error) */
  attempts?: number
  /** pause before the second try; each further pause is four times longer */
  backoffMs?: number
  onClose?: () => void
}

/**
 * Delivers in the background, one message after another in the order accepted, with retries.
 * Answers never wait for SMTP, so whether a mail was sent cannot be read off the response time
 * (password reset, sign-up). Messages carry tokens: only the recipient and subject are logged.
 */
export function queuedMailer(deliver: Deliver, opts: QueueOptions = {}): QueuedMailer {
  const attempts = opts.attempts ?? 5
  const backoffMs = opts.backoffMs ?? 1000
  const queue: MailMessage[] = []
  let running = false
  let closed = false, released = false
  let waiters: Array<() => void> = []

  const settle = () => {
    if (running || queue.length) return
    for (const w of waiters) w()
    waiters = []
    if (closed && !released) { released = true; opts.onClose?.() }
  }

  async function deliverWithRetries(m: MailMessage) {
    for (let attempt = 1; ; attempt++) {
      try {
        await deliver(m)
        return
      } catch (err) {
        if (attempt >= attempts) {
          logger.error({ err, to: m.to, subject: m.subject, attempts }, 'mail could not be delivered; giving up')
          return
        }
        const wait = backoffMs * 4 ** (attempt - 1)
        logger.warn({ err, to: m.to, subject: m.subject, attempt, retryInMs: wait }, 'mail delivery failed; retrying')
        await new Promise((ok) => setTimeout(ok, wait).unref())
      }
    }
  }

  async function run() {
    running = true
    while (queue.length) await deliverWithRetries(queue.shift()!)
    running = false
    settle()
  }

  return {
    async send(m) {
      if (closed) { logger.warn({ to: m.to, subject: m.subject }, 'mailer closed; message dropped'); return }
      queue.push(m)
      if (!running) void run()
    },
    idle: () => new Promise<void>((ok) => { waiters.push(ok); settle() }),
    close() { closed = true; settle() },
  }
}

/** One SMTP connection pool through nodemailer: the local catcher in development and tests, a relay via SMTP_URL. */
export function smtpDelivery(smtpUrl: string): { deliver: Deliver; close: () => void } {
  const transport = nodemailer.createTransport(smtpUrl)
  return {
    deliver: async (m) => { await transport.sendMail({ from: MAIL_FROM, ...m }) },
    close: () => transport.close(),
  }
}

/** The product's mailer: SMTP behind the background queue. */
export function smtpMailer(smtpUrl: string, opts: Omit<QueueOptions, 'onClose'> = {}): QueuedMailer {
  const smtp = smtpDelivery(smtpUrl)
  return queuedMailer(smtp.deliver, { ...opts, onClose: smtp.close })
}
