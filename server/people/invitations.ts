// Invitations: a mentor invites a person into a team (or as a mentor); the link makes the account.
import { createError } from 'h3'
import type { InvitationPreview, PendingInvitation } from '#shared/types/api'
import type { Role } from '#shared/types/roles'
import { inTransaction, type Db } from '../platform/db'
import { fieldError } from '../platform/http'
import { absoluteUrl, queueMail } from '../platform/mail'
import { hashPassword } from '../platform/passwords'
import { hashToken, INVITATION_TTL_MS, newToken } from '../platform/tokens'
import type { Actor } from '../policy'
import { audit, by } from '../history/service'
import { invitationMail } from '../mail/templates'
import { teamOfProgram } from './queries'

export const LINK_GONE = 'This link has expired or was already used.'
export const LINK_UNKNOWN = 'This link is not known. Check that you copied all of it.'

export async function listInvitations(db: Db, actor: Actor, teamId?: number): Promise<PendingInvitation[]> {
  let q = db.selectFrom('invitation')
    .leftJoin('team', 'team.id', 'invitation.team_id')
    .leftJoin('users as inviter', 'inviter.id', 'invitation.invited_by')
    .select(['invitation.id', 'invitation.email', 'invitation.name', 'invitation.role', 'invitation.team_id',
      'team.name as team_name', 'invitation.expires_at', 'inviter.name as inviter_name'])
    .where('invitation.program_id', '=', actor.programId)
    .where('invitation.used_at', 'is', null)
    .where('invitation.expires_at', '>', new Date())
    .orderBy('invitation.created_at', 'desc')
  if (teamId) q = q.where('invitation.team_id', '=', teamId)
  const rows = await q.execute()
  return rows.map((r) => ({
    id: r.id, email: r.email, name: r.name, role: r.role, teamId: r.team_id, teamName: r.team_name,
    expiresAt: new Date(r.expires_at).toISOString(), invitedBy: r.inviter_name,
  }))
}

export async function createInvitation(db: Db, actor: Actor, input: { email: string; name: string; role: Role; teamId?: number | null }): Promise<PendingInvitation> {
  const teamId = input.role === 'mentor' ? null : input.teamId ?? null
  const { token, hash } = newToken()
  return inTransaction(db, async (trx) => {
    let teamName: string | null = null
    if (teamId) {
      const team = await teamOfProgram(trx, actor.programId, teamId)
      if (!team) throw fieldError(400, 'Please check the form: choose one of your teams.', 'teamId', 'Choose one of the program\'s teams.')
      teamName = team.name
    }
    const existing = await trx.selectFrom('users').select(['id', 'program_id']).where('email', '=', input.email).executeTakeFirst()
    if (existing) {
      const message = existing.program_id === actor.programId
        ? 'This person already has an account: change their role on the People page instead.'
        : 'This e-mail address already has an account elsewhere.'
      throw fieldError(409, message, 'email')
    }
    const program = await trx.selectFrom('program').select('name').where('id', '=', actor.programId).executeTakeFirstOrThrow()
    // A new invitation to the same address replaces an older, unused one.
    await trx.updateTable('invitation').set({ used_at: new Date() })
      .where('program_id', '=', actor.programId).where('email', '=', input.email).where('used_at', 'is', null).execute()
    const row = await trx.insertInto('invitation').values({
      program_id: actor.programId, email: input.email, name: input.name, role: input.role, team_id: teamId,
      token_hash: hash, invited_by: actor.id, expires_at: new Date(Date.now() + INVITATION_TTL_MS),
    }).returning(['id', 'expires_at']).executeTakeFirstOrThrow()
    await audit(trx, {
      ...by(actor), action: 'invite', subject: 'invitation', subjectId: row.id,
      detail: { email: input.email, name: input.name, role: input.role, team: teamName },
    })
    // Into the outbox with the invitation: both are kept, or neither.
    await queueMail(trx, actor.programId, invitationMail({
      to: input.email, name: input.name, inviter: actor.name, programName: program.name, role: input.role, teamName,
      url: absoluteUrl(`/invitations/${token}`),
    }))
    return {
      id: row.id, email: input.email, name: input.name, role: input.role, teamId, teamName,
      expiresAt: new Date(row.expires_at).toISOString(), invitedBy: actor.name,
    }
  })
}

/** 404 for an invitation of another program, or one already used or withdrawn. */
export async function withdrawInvitation(db: Db, actor: Actor, id: number): Promise<void> {
  await inTransaction(db, async (trx) => {
    const row = await trx.updateTable('invitation').set({ used_at: new Date() })
      .where('id', '=', id).where('program_id', '=', actor.programId).where('used_at', 'is', null)
      .returning(['email']).executeTakeFirst()
    if (!row) throw createError({ statusCode: 404, message: 'No such invitation.' })
    await audit(trx, { ...by(actor), action: 'withdraw-invitation', subject: 'invitation', subjectId: id, detail: { email: row.email } })
  })
}

async function findInvitation(db: Db, token: string, lock = false) {
  let q = db.selectFrom('invitation').selectAll().where('token_hash', '=', hashToken(token))
  if (lock) q = q.forUpdate()
  const inv = await q.executeTakeFirst()
  if (!inv) throw createError({ statusCode: 404, message: LINK_UNKNOWN })
  if (inv.used_at || new Date(inv.expires_at).getTime() <= Date.now()) throw createError({ statusCode: 410, message: LINK_GONE })
  return inv
}

export async function previewInvitation(db: Db, token: string): Promise<InvitationPreview> {
  const inv = await findInvitation(db, token)
  const program = await db.selectFrom('program').select('name').where('id', '=', inv.program_id).executeTakeFirstOrThrow()
  const team = inv.team_id ? await db.selectFrom('team').select('name').where('id', '=', inv.team_id).executeTakeFirst() : undefined
  return { email: inv.email, name: inv.name, role: inv.role, teamName: team?.name ?? null, programName: program.name }
}

/** Makes the invited person's account; returns its id so the route can start the session. */
export async function acceptInvitation(db: Db, token: string, input: { password: string; name?: string }, ip: string | null): Promise<number> {
  const passwordHash = await hashPassword(input.password)
  return inTransaction(db, async (trx) => {
    const inv = await findInvitation(trx, token, true)
    const taken = await trx.selectFrom('users').select('id').where('email', '=', inv.email).executeTakeFirst()
    if (taken) throw createError({ statusCode: 409, message: 'An account with this e-mail address exists already: sign in instead.' })
    const user = await trx.insertInto('users').values({
      program_id: inv.program_id, email: inv.email, name: input.name ?? inv.name, password_hash: passwordHash,
    }).returning('id').executeTakeFirstOrThrow()
    if (inv.role === 'mentor') await trx.insertInto('mentorship').values({ user_id: user.id, program_id: inv.program_id }).execute()
    else await trx.insertInto('membership').values({ user_id: user.id, team_id: inv.team_id!, role: inv.role }).execute()
    await trx.updateTable('invitation').set({ used_at: new Date() }).where('id', '=', inv.id).execute()
    await audit(trx, { programId: inv.program_id, actorId: user.id, ip, action: 'accept-invitation', subject: 'user', subjectId: user.id, detail: { role: inv.role } })
    return user.id
  })
}
