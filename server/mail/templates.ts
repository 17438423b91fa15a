// The words of every message we send: plain text and HTML, both from the same parts.
import type { OutgoingMail } from '../platform/mail'
import type { JobKind } from '#shared/types/robots'

function escapeHtml(s: string): string {
  return s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!)
}

interface Parts {
  to: string | string[]
  subject: string
  greeting: string
  lines: string[]
  action?: { label: string; url: string }
  /** Things listed one a line after the lines, each with its own link. */
  list?: { text: string; url: string; label: string }[]
  after?: string[]
}

export function compose(p: Parts): OutgoingMail {
  const list = (p.list ?? []).flatMap((i) => [`- ${i.text}`, `  ${i.label}: ${i.url}`])
  const text = [p.greeting, '', ...p.lines, ...(list.length ? ['', ...list] : []), ...(p.action ? ['', `${p.action.label}: ${p.action.url}`] : []), ...(p.after ? ['', ...p.after] : []), '', '— Decalwright'].join('\n')
  const para = (s: string) => `<p style="margin:0 0 12px">${escapeHtml(s)}</p>`
  const html = `<!doctype html><html><body style="font-family:system-ui,sans-serif;color:#23211d;background:#f6f4ef;padding:24px">
<div style="max-width:560px;margin:auto;background:#fff;border:1px solid #d9d3c7;border-radius:8px;padding:24px">
${para(p.greeting)}${p.lines.map(para).join('')}
${p.list?.length ? `<ul style="margin:0 0 12px;padding-left:20px">${p.list.map((i) => `<li style="margin:0 0 6px">${escapeHtml(i.text)} · <a href="${escapeHtml(i.url)}">${escapeHtml(i.label)}</a></li>`).join('')}</ul>` : ''}
${p.action ? `<p style="margin:20px 0"><a href="${escapeHtml(p.action.url)}" style="background:#0f6e6a;color:#fff;padding:10px 16px;border-radius:6px;text-decoration:none">${escapeHtml(p.action.label)}</a></p><p style="margin:0 0 12px;font-size:13px;color:#5b574f">Or open this address: ${escapeHtml(p.action.url)}</p>` : ''}
${(p.after ?? []).map(para).join('')}
<p style="margin:16px 0 0;color:#5b574f">— Decalwright</p></div></body></html>`
  return { to: p.to, subject: p.subject, text, html }
}

const ROLE_WORDS: Record<string, string> = {
  student: 'a student', designer: 'a designer', operator: 'a laser operator', mentor: 'a mentor',
}

export function invitationMail(o: { to: string; name: string; inviter: string; programName: string; role: string; teamName: string | null; url: string }): OutgoingMail {
  const where = o.teamName ? ` on ${o.teamName}` : ''
  return compose({
    to: o.to,
    subject: `You're invited to ${o.programName} on Decalwright`,
    greeting: `Hello ${o.name},`,
    lines: [`${o.inviter} invited you to join ${o.programName} as ${ROLE_WORDS[o.role] ?? o.role}${where}.`,
      'Decalwright is where the program turns drawings into approved, cut-ready decals for its robots.'],
    action: { label: 'Accept and set your password', url: o.url },
    after: ['The link works once and expires in 7 days. If you did not expect this, ignore this message.'],
  })
}

export function resetMail(o: { to: string; name: string; url: string }): OutgoingMail {
  return compose({
    to: o.to,
    subject: 'Reset your Decalwright password',
    greeting: `Hello ${o.name},`,
    lines: ['Someone (we hope you) asked to reset the password of your Decalwright account.'],
    action: { label: 'Choose a new password', url: o.url },
    after: ['The link works once and expires in one hour. If you did not ask for this, ignore this message: your password stays as it is.'],
  })
}

export function reviewRequestMail(o: { to: string[]; author: string; title: string; team: string; number: number; url: string }): OutgoingMail {
  return compose({
    to: o.to,
    subject: `Review requested: ${o.title} (revision ${o.number})`,
    greeting: 'Hello,',
    lines: [`${o.author} of ${o.team} submitted revision ${o.number} of "${o.title}" for review.`,
      'Approve it, or send it back with a comment saying what to change.'],
    action: { label: 'Open the revision', url: o.url },
  })
}

export function decisionMail(o: { to: string; name: string; title: string; number: number; decision: 'approve' | 'send-back'; reviewer: string; comment: string; url: string }): OutgoingMail {
  const approved = o.decision === 'approve'
  return compose({
    to: o.to,
    subject: `${approved ? 'Approved' : 'Sent back'}: ${o.title} (revision ${o.number})`,
    greeting: `Hello ${o.name},`,
    lines: [
      approved
        ? `${o.reviewer} approved revision ${o.number} of "${o.title}". It is locked now and can be placed on a robot.`
        : `${o.reviewer} sent revision ${o.number} of "${o.title}" back.`,
      ...(o.comment ? [`Comment: ${o.comment}`] : []),
    ],
    action: { label: 'Open the revision', url: o.url },
  })
}

const JOB_SUBJECT: Record<JobKind, string> = { initial: 'New cut job', reprint: 'Reprint', recut: 'Recut', extra: 'More copies' }

export function newJobMail(o: { to: string[]; kind: JobKind; title: string; robot: string; spot: string; quantity: number; reason: string; by: string; url: string }): OutgoingMail {
  return compose({
    to: o.to,
    subject: `${JOB_SUBJECT[o.kind]}: ${o.quantity} × ${o.title} for ${o.robot}`,
    greeting: 'Hello,',
    lines: [
      `${o.by} queued ${o.quantity} ${o.quantity === 1 ? 'copy' : 'copies'} of "${o.title}" for the ${o.spot} of ${o.robot}.`,
      ...(o.reason ? [`Reason: ${o.reason}`] : []),
      'The cut sheet, the film and its laser settings are on the job page. Follow the lab\'s safety rules at the machine.',
    ],
    action: { label: 'Open the job', url: o.url },
  })
}

/** One job of several queued at once, as the operators' mail lists it. */
export interface ListedJob {
  title: string
  robot: string
  spot: string
  quantity: number
  /** The film it is cut from. */
  film: string
  /** Of a layered decal: which layer, bottom first. */
  layer: { position: number; count: number; name: string } | null
  url: string
}

const copies = (n: number) => `${n} ${n === 1 ? 'copy' : 'copies'}`
const layerWords = (l: NonNullable<ListedJob['layer']>) => `layer ${l.position + 1} of ${l.count}${l.position === 0 ? ' (bottom)' : ''}: ${l.name}`

/**
 * Several jobs queued by one change (a layered decal's order, one job per layer; an event
 * kit's reprints): one message listing every job with its own link, so the operators get one
 * mail per change, not one per job.
 */
export function newJobsMail(o: { to: string[]; kind: JobKind; jobs: ListedJob[]; reason: string; by: string }): OutgoingMail {
  const first = o.jobs[0]!
  const decals = new Set(o.jobs.map((j) => JSON.stringify([j.title, j.robot, j.spot])))
  const robots = [...new Set(o.jobs.map((j) => j.robot))]
  // One layered decal (an order): said as that decal; anything more, as the jobs.
  const order = decals.size === 1 && first.layer !== null
  const subject = order
    ? `${JOB_SUBJECT[o.kind]}: ${first.quantity} × ${first.title} for ${first.robot}, in ${first.layer!.count} layers`
    : `${JOB_SUBJECT[o.kind]}: ${o.jobs.length} jobs for ${robots.join(', ')}`
  const opening = order
    ? `${o.by} queued ${copies(first.quantity)} of "${first.title}" for the ${first.spot} of ${first.robot}: a decal of ${first.layer!.count} layers, one job per layer, each cut from its own film and laid bottom first in register.`
    : `${o.by} queued ${o.jobs.length} jobs at once for ${robots.join(', ')}, ${copies(o.jobs.reduce((n, j) => n + j.quantity, 0))} in all.`
  return compose({
    to: o.to,
    subject,
    greeting: 'Hello,',
    lines: [opening, ...(o.reason ? [`Reason: ${o.reason}`] : [])],
    list: o.jobs.map((j) => ({
      text: order
        ? `${layerWords(j.layer!).replace(/^l/, 'L')}, ${copies(j.quantity)} in ${j.film}`
        : `"${j.title}" for the ${j.spot}${j.layer ? `, ${layerWords(j.layer)}` : ''}: ${copies(j.quantity)} in ${j.film}`,
      url: j.url, label: 'Open the job',
    })),
    after: ['Each job\'s page has its cut sheet, the film and its laser settings. Follow the lab\'s safety rules at the machine.'],
  })
}
