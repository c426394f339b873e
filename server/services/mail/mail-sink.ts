import type { AddressObject } from 'mailparser'
import type { Db } from '../../db/client'
import { mailReceived } from '../../db/schema/index'
import type { Logger } from '../../logger'

function addresses(a: AddressObject | AddressObject[] | undefined): string {
  if (!a) return ''
  return (Array.isArray(a) ? a : [a]).map((x) => x.text).join(', ')
}

/**
 * A loopback SMTP server that stores every message it receives in `mail_received`, so development
 * and tests send real mail through nodemailer without any outside service. Its packages are loaded
 * here, on first use, so a server that sends through a real SMTP relay never loads them.
 */
export async function startMailSink(
  db: Db,
  port: number,
  log: Logger,
): Promise<{ port: number; close: () => Promise<void> }> {
  const [{ SMTPServer }, { simpleParser }] = await Promise.all([import('smtp-server'), import('mailparser')])
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS', 'AUTH'],
    logger: false,
    size: 10 * 1024 * 1024,
    onData(stream, _session, callback) {
      simpleParser(stream)
        .then(async (mail) => {
          await db.insert(mailReceived).values({
            fromAddress: addresses(mail.from).slice(0, 250) || '(none)',
            toAddress: addresses(mail.to).slice(0, 500) || '(none)',
            subject: (mail.subject ?? '(no subject)').slice(0, 250),
            textBody: mail.text ?? '',
            htmlBody: typeof mail.html === 'string' ? mail.html : null,
          })
          callback()
        })
        .catch((err: Error) => {
          log.error({ err }, 'mail sink: storing a message failed')
          callback(err)
        })
    },
  })
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject)
    server.listen(port, '127.0.0.1', () => resolve())
  })
  const addr = server.server.address()
  const actual = typeof addr === 'object' && addr ? addr.port : port
  return { port: actual, close: () => new Promise((r) => server.close(() => r())) }
}
