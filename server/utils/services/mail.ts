/**
 * Outgoing mail through nodemailer. With NUXT_SMTP_URL unset (demo, test) the app starts its own
 * SMTP sink on a loopback port and sends to it over real SMTP. Every message is also kept in the
 * mail_outbox table, which admins read in the app.
 */
import { createTransport, type Transporter } from 'nodemailer'
import { SMTPServer } from 'smtp-server'
import { eq } from 'drizzle-orm'
import { useDb, schema } from '../storage/db'

let transport: Promise<Transporter> | undefined
let sinkReceived = 0

/** Messages the local sink has accepted since start (0 when a real SMTP server is configured). */
export function sinkCount (): number {
  return sinkReceived
}

function smtpUrl (): string {
  try {
    return useRuntimeConfig().smtpUrl
  }
  catch {
    return process.env.NUXT_SMTP_URL ?? ''
  }
}

async function startSink (): Promise<number> {
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS', 'AUTH'],
    banner: 'Crosspoint local mail sink',
    logger: false,
    onData (stream, _session, done) {
      stream.on('data', () => {})
      stream.on('end', () => {
        sinkReceived++
        done()
      })
    }
  })
  return new Promise((resolve, reject) => {
    server.once('error', reject)
    server.listen(0, '127.0.0.1', () => resolve((server.server.address() as { port: number }).port))
  })
}

async function useTransport (): Promise<Transporter> {
  if (!transport) {
    transport = (async () => {
      const url = smtpUrl()
      if (url) return createTransport(url)
      const port = await startSink()
      return createTransport({ host: '127.0.0.1', port, secure: false, ignoreTLS: true })
    })()
    transport.catch(() => {
      transport = undefined
    })
  }
  return transport
}

export const MAIL_FROM = 'Crosspoint <no-reply@crosspoint.example>'

/** Records the message in the outbox, then sends it; a failed send is kept as failed, never thrown at the caller. */
export async function sendMail (to: string, subject: string, text: string, headers?: Record<string, string>): Promise<number> {
  const db = await useDb()
  const [row] = await db.insert(schema.mailOutbox).values({ to, subject, text }).returning({ id: schema.mailOutbox.id })
  try {
    const t = await useTransport()
    await t.sendMail({ from: MAIL_FROM, to, subject, text, headers })
    await db
      .update(schema.mailOutbox)
      .set({ status: 'sent', sentAt: new Date() })
      .where(eq(schema.mailOutbox.id, row!.id))
  }
  catch (e) {
    await db
      .update(schema.mailOutbox)
      .set({ status: 'failed', error: (e as Error).message })
      .where(eq(schema.mailOutbox.id, row!.id))
  }
  return row!.id
}

export function publicUrl (path: string): string {
  let base = process.env.NUXT_PUBLIC_BASE_URL ?? 'http://localhost:3000'
  try {
    base = useRuntimeConfig().public.baseUrl
  }
  catch {
    /* outside Nitro */
  }
  return base.replace(/\/$/, '') + path
}
