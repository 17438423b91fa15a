import type { H3Event } from 'h3'
import type { Actor } from './actor'
import type { Transaction } from 'kysely'
import type { Database } from '../db/schema'
import type { InvitationPreview, PendingInvitation, ResetPreview } from '#shared/types/api'
import type { Role } from '#shared/types/roles'
import { invitationMail, resetMail } from '../mail/templates'

const GONE = 'This link has expired or was already used.'

// ---------- invitations ----------

export async function listInvitations(programId: number, teamId?: number): Promise<PendingInvitation[]> {
  let q = useDb().selectFrom('invitation')
    .leftJoin('team', 'team.id', 'invitation.team_id')
    .leftJoin('users as inviter', 'inviter.id', 'invitation.invited_by')
    .select(['invitation.id', 'invitation.email', 'invitation.name', 'invitation.role', 'invitation.team_id',
      'team.name as team_name', 'invitation.expires_at', 'inviter.name as inviter_name'])
    .where('invitation.program_id', '=', programId)
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

export async function createInvitation(event: H3Event, actor: Actor, input: { email: string; name: string; role: Role; teamId?: number | null }): Promise<PendingInvitation> {
  const db = useDb()
  const teamId = input.role === 'mentor' ? null : input.teamId ?? null
  let teamName: string | null = null
  if (teamId) {
    const team = await db.selectFrom('team').select(['id', 'name']).where('id', '=', teamId).where('program_id', '=', actor.programId).executeTakeFirst()
    if (!team) throw createError({ statusCode: 400, message: 'Please check the form: choose one of your teams.', data: { fieldErrors: { teamId: ['Choose one of the program\'s teams.'] } } })
    teamName = team.name
  }
  const existing = await db.selectFrom('users').select(['id', 'program_id']).where('email', '=', input.email).executeTakeFirst()
  if (existing) {
    const message = existing.program_id === actor.programId
      ? 'This person already has an account: change their role on the People page instead.'
      : 'This e-mail address already has an account elsewhere.'
    throw createError({ statusCode: 409, message, data: { fieldErrors: { email: [message] } } })
  }
  const program = await db.selectFrom('program').select('name').where('id', '=', actor.programId).executeTakeFirstOrThrow()
  const { token, hash } = newToken()
  return db.transaction().execute(async (trx) => {
    // A new invitation to the same address replaces an older, unused one.
    await trx.updateTable('invitation').set({ used_at: new Date() })
      .where('program_id', '=', actor.programId).where('email', '=', input.email).where('used_at', 'is', null).execute()
    const row = await trx.insertInto('invitation').values({
      program_id: actor.programId, email: input.email, name: input.name, role: input.role, team_id: teamId,
      token_hash: hash, invited_by: actor.id, expires_at: new Date(Date.now() + INVITATION_TTL_MS),
    }).returning(['id', 'expires_at']).executeTakeFirstOrThrow()
    await audit(trx, event, {
      programId: actor.programId, actorId: actor.id, action: 'invite', subjectType: 'invitation', subjectId: row.id,
      detail: { email: input.email, name: input.name, role: input.role, team: teamName },
    })
    // Sent inside the transaction: if the mail cannot go out, no invitation is left behind.
    await sendMail(invitationMail({
      to: input.email, name: input.name, inviter: actor.name, programName: program.name, role: input.role, teamName,
      url: absoluteUrl(`/invitations/${token}`),
    }))
    return {
      id: row.id, email: input.email, name: input.name, role: input.role, teamId, teamName,
      expiresAt: new Date(row.expires_at).toISOString(), invitedBy: actor.name,
    }
  })
}

export async function withdrawInvitation(event: H3Event, actor: Actor, id: number): Promise<void> {
  await useDb().transaction().execute(async (trx) => {
    const row = await trx.updateTable('invitation').set({ used_at: new Date() })
      .where('id', '=', id).where('program_id', '=', actor.programId).where('used_at', 'is', null)
      .returning(['email']).executeTakeFirst()
    if (!row) throw createError({ statusCode: 404, message: 'No such invitation.' })
    await audit(trx, event, { programId: actor.programId, actorId: actor.id, action: 'withdraw-invitation', subjectType: 'invitation', subjectId: id, detail: { email: row.email } })
  })
}

async function findInvitation(db: Transaction<Database> | ReturnType<typeof useDb>, token: string, lock = false) {
  let q = db.selectFrom('invitation').selectAll().where('token_hash', '=', hashToken(token))
  if (lock) q = q.forUpdate()
  const inv = await q.executeTakeFirst()
  if (!inv) throw createError({ statusCode: 404, message: 'This link is not known. Check that you copied all of it.' })
  if (inv.used_at || new Date(inv.expires_at).getTime() <= Date.now()) throw createError({ statusCode: 410, message: GONE })
  return inv
}

export async function previewInvitation(token: string): Promise<InvitationPreview> {
  const db = useDb()
  const inv = await findInvitation(db, token)
  const program = await db.selectFrom('program').select('name').where('id', '=', inv.program_id).executeTakeFirstOrThrow()
  const team = inv.team_id ? await db.selectFrom('team').select('name').where('id', '=', inv.team_id).executeTakeFirst() : undefined
  return { email: inv.email, name: inv.name, role: inv.role, teamName: team?.name ?? null, programName: program.name }
}

export async function acceptInvitation(event: H3Event, token: string, input: { password: string; name?: string }): Promise<{ home: string }> {
  const passwordHash = await hashPassword(input.password)
  const userId = await useDb().transaction().execute(async (trx) => {
    const inv = await findInvitation(trx, token, true)
    const taken = await trx.selectFrom('users').select('id').where('email', '=', inv.email).executeTakeFirst()
    if (taken) throw createError({ statusCode: 409, message: 'An account with this e-mail address exists already: sign in instead.' })
    const user = await trx.insertInto('users').values({
      program_id: inv.program_id, email: inv.email, name: input.name ?? inv.name, password_hash: passwordHash,
    }).returning('id').executeTakeFirstOrThrow()
    if (inv.role === 'mentor') await trx.insertInto('mentorship').values({ user_id: user.id, program_id: inv.program_id }).execute()
    else await trx.insertInto('membership').values({ user_id: user.id, team_id: inv.team_id!, role: inv.role }).execute()
    await trx.updateTable('invitation').set({ used_at: new Date() }).where('id', '=', inv.id).execute()
    await audit(trx, event, { programId: inv.program_id, actorId: user.id, action: 'accept-invitation', subjectType: 'user', subjectId: user.id, detail: { role: inv.role } })
    return user.id
  })
  await startSession(event, userId)
  return { home: homeFor(await loadActorFresh(event)) }
}

// ---------- password resets and first passwords ----------

export async function requestReset(event: H3Event, email: string): Promise<void> {
  const db = useDb()
  const user = await db.selectFrom('users').select(['id', 'name', 'email', 'program_id', 'active']).where('email', '=', email).executeTakeFirst()
  // The answer is the same whether or not the address has an account.
  if (!user || !user.active) return
  const { token, hash } = newToken()
  await db.transaction().execute(async (trx) => {
    await trx.insertInto('password_reset').values({ user_id: user.id, token_hash: hash, purpose: 'reset', expires_at: new Date(Date.now() + RESET_TTL_MS) }).execute()
    await audit(trx, event, { programId: user.program_id, actorId: user.id, action: 'request-reset', subjectType: 'user', subjectId: user.id })
    await sendMail(resetMail({ to: user.email, name: user.name, url: absoluteUrl(`/reset/${token}`) }))
  })
}

async function findReset(db: Transaction<Database> | ReturnType<typeof useDb>, token: string, lock = false) {
  let q = db.selectFrom('password_reset').innerJoin('users', 'users.id', 'password_reset.user_id')
    .select(['password_reset.id', 'password_reset.user_id', 'password_reset.purpose', 'password_reset.expires_at', 'password_reset.used_at', 'users.email', 'users.active', 'users.program_id'])
    .where('password_reset.token_hash', '=', hashToken(token))
  if (lock) q = q.forUpdate()
  const row = await q.executeTakeFirst()
  if (!row) throw createError({ statusCode: 404, message: 'This link is not known. Check that you copied all of it.' })
  if (row.used_at || new Date(row.expires_at).getTime() <= Date.now() || !row.active) throw createError({ statusCode: 410, message: GONE })
  return row
}

export async function previewReset(token: string): Promise<ResetPreview> {
  const row = await findReset(useDb(), token)
  return { email: row.email, purpose: row.purpose }
}

export async function completeReset(event: H3Event, token: string, password: string): Promise<{ home: string }> {
  const passwordHash = await hashPassword(password)
  const userId = await useDb().transaction().execute(async (trx) => {
    const row = await findReset(trx, token, true)
    await trx.updateTable('users').set({ password_hash: passwordHash }).where('id', '=', row.user_id).execute()
    // Every other outstanding link for this account dies with this one.
    await trx.updateTable('password_reset').set({ used_at: new Date() }).where('user_id', '=', row.user_id).where('used_at', 'is', null).execute()
    await audit(trx, event, { programId: row.program_id, actorId: row.user_id, action: row.purpose === 'welcome' ? 'set-first-password' : 'reset-password', subjectType: 'user', subjectId: row.user_id })
    return row.user_id
  })
  await startSession(event, userId)
  return { home: homeFor(await loadActorFresh(event)) }
}
