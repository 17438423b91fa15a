import nodemailer, { type Transporter } from 'nodemailer'

let transport: Transporter | undefined

function useTransport(): Transporter {
  if (!transport) {
    const url = useRuntimeConfig().smtpUrl
    if (!url) throw new Error('NUXT_SMTP_URL is not set: the app needs an SMTP server to send mail.')
    transport = nodemailer.createTransport(url)
  }
  return transport
}

export interface OutgoingMail {
  to: string | string[]
  subject: string
  text: string
  html: string
}

/** Sends one message; a failure becomes a 502 the caller can roll back on. */
export async function sendMail(mail: OutgoingMail): Promise<void> {
  try {
    await useTransport().sendMail({ from: useRuntimeConfig().mailFrom, ...mail })
  } catch (err) {
    console.error('[decalwright] mail failed:', err)
    throw createError({ statusCode: 502, message: 'The e-mail could not be sent, so nothing was changed. Try again in a moment.' })
  }
}

export function absoluteUrl(path: string): string {
  return new URL(path, useRuntimeConfig().public.baseUrl).toString()
}
