import { readdir, readFile } from 'node:fs/promises'
import path from 'node:path'
import { simpleParser, type AddressObject } from 'mailparser'
import type { MailMessage, MailSummary } from '#shared/types/api'
import { platformConfig } from './config'

// The local SMTP fake keeps each message as an .eml file; these read them back for the
// mentor's mail page. Only present while the fake is in use (NUXT_MAIL_OUTBOX_DIR).
export function outboxDir(): string | null {
  return platformConfig().mailOutboxDir || null
}

function addresses(a: AddressObject | AddressObject[] | undefined): string {
  if (!a) return ''
  return (Array.isArray(a) ? a : [a]).map((x) => x.text).join(', ')
}

const SAFE_NAME = /^[\w.-]+\.eml$/

export async function listOutbox(dir: string, limit = 200): Promise<MailSummary[]> {
  const names = (await readdir(dir)).filter((n) => SAFE_NAME.test(n)).sort().reverse().slice(0, limit)
  return Promise.all(names.map(async (name) => {
    const m = await simpleParser(await readFile(path.join(dir, name)))
    return { id: name.replace(/\.eml$/, ''), date: (m.date ?? new Date(0)).toISOString(), from: addresses(m.from), to: addresses(m.to), subject: m.subject ?? '' }
  }))
}

export async function readOutboxMessage(dir: string, id: string): Promise<MailMessage | null> {
  const name = `${id}.eml`
  if (!SAFE_NAME.test(name)) return null
  let raw: Buffer
  try {
    raw = await readFile(path.join(dir, name))
  } catch {
    return null
  }
  const m = await simpleParser(raw)
  return {
    id, date: (m.date ?? new Date(0)).toISOString(), from: addresses(m.from), to: addresses(m.to),
    subject: m.subject ?? '', text: m.text ?? '', html: typeof m.html === 'string' ? m.html : null,
  }
}
