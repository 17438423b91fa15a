import nodemailer, { type Transporter } from 'nodemailer'
import { createError } from 'h3'
import { platformConfig } from './config'

let transport: Transporter | undefined

function useTransport(): Transporter {
  const config = platformConfig()
  if (config.mailTransport) return config.mailTransport
  if (!transport) {
    if (!config.smtpUrl) throw new Error('NUXT_SMTP_URL is not set: the app needs an SMTP server to send mail.')
    transport = nodemailer.createTransport(config.smtpUrl)
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
    await useTransport().sendMail({ from: platformConfig().mailFrom, ...mail })
  } catch (err) {
    console.error('[decalwright] mail failed:', err)
    throw createError({ statusCode: 502, message: 'The e-mail could not be sent, so nothing was changed. Try again in a moment.' })
  }
}

export function absoluteUrl(path: string): string {
  return new URL(path, platformConfig().baseUrl).toString()
}
