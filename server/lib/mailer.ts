import nodemailer from 'nodemailer'

export interface MailMessage { to: string; subject: string; text: string; html?: string }
export interface Mailer { send(message: MailMessage): Promise<void>; close(): void }

export const MAIL_FROM = 'Ratiograph <no-reply@ratiograph.invalid>'

/** SMTP through nodemailer: the local catcher in development and tests, a real relay via SMTP_URL. */
export function smtpMailer(smtpUrl: string): Mailer {
  const transport = nodemailer.createTransport(smtpUrl)
  return {
    async send(m) { await transport.sendMail({ from: MAIL_FROM, ...m }) },
    close() { transport.close() },
  }
}
