// Reads what the app sent from the SMTP fake's outbox (real SMTP delivery, then parsed).
import { readdir, readFile } from 'node:fs/promises'
import path from 'node:path'
import { inject } from 'vitest'
import { simpleParser, type ParsedMail } from 'mailparser'

export async function allMail(): Promise<ParsedMail[]> {
  const dir = inject('mailDir')
  const names = (await readdir(dir)).filter((n) => n.endsWith('.eml')).sort()
  return Promise.all(names.map(async (n) => simpleParser(await readFile(path.join(dir, n)))))
}

function recipients(m: ParsedMail): string[] {
  const to = Array.isArray(m.to) ? m.to : m.to ? [m.to] : []
  return to.flatMap((a) => a.value.map((v) => (v.address ?? '').toLowerCase()))
}

/** Waits for a message to `to` whose subject matches; mail is delivered asynchronously. */
export async function waitForMail(to: string, subject: RegExp, timeoutMs = 10_000): Promise<ParsedMail> {
  const deadline = Date.now() + timeoutMs
  for (;;) {
    const found = (await allMail()).filter((m) => recipients(m).includes(to.toLowerCase()) && subject.test(m.subject ?? ''))
    if (found.length) return found[found.length - 1]!
    if (Date.now() > deadline) throw new Error(`no mail to ${to} matching ${subject} within ${timeoutMs} ms`)
    await new Promise((r) => setTimeout(r, 100))
  }
}

export async function mailTo(to: string): Promise<ParsedMail[]> {
  return (await allMail()).filter((m) => recipients(m).includes(to.toLowerCase()))
}

/** The first link in the plain-text part that points at `pathPrefix`. */
export function linkIn(m: ParsedMail, pathPrefix: string): string {
  const match = (m.text ?? '').match(new RegExp(`https?://\\S+${pathPrefix.replace(/\//g, '\\/')}\\S+`))
  if (!match) throw new Error(`no ${pathPrefix} link in: ${m.text}`)
  return match[0]
}
