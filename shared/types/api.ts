// Shapes of the JSON the API answers with. Client and server both use these.
import type { AuditAction, AuditSubject } from './audit'
import type { Can, TeamAction } from './policy'
import type { MemberRole, Role } from './roles'

/** One page of a list; `nextCursor` asks for the next page (`?cursor=`), null on the last. */
export interface Page<T> {
  items: T[]
  nextCursor: string | null
}

export interface MeTeam {
  id: number
  name: string
  number: string | null
  colour: string
  /** The user's role in this team; 'mentor' for a mentor who is not a member of it. */
  role: MemberRole | 'mentor'
  /** What the user may do in this team. */
  can: Can<TeamAction>
}

export interface Me {
  user: { id: number; name: string; email: string }
  program: { id: number; name: string; school: string; laserWorkArea: { widthMm: number; heightMm: number } | null }
  isMentor: boolean
  /** Every distinct role the user holds anywhere in the program. */
  roles: Role[]
  teams: MeTeam[]
  /** The page this user's role starts on: '/program' (mentor), '/lab' (operator), '/studio' (student, designer). */
  home: string
  /** True when the local mail fake is in use, so the mentor's mail page exists. */
  mailFake: boolean
  /** What the user may do in the program (a team action: in at least one team). */
  can: Can
}

export interface TeamSummary {
  id: number
  name: string
  number: string | null
  colour: string
  memberCount: number
  myRole: MemberRole | 'mentor' | null
}

export interface TeamMember {
  userId: number
  name: string
  /** Only for those who manage people; null for everyone else. */
  email: string | null
  role: MemberRole
  active: boolean
}

export interface PendingInvitation {
  id: number
  email: string
  name: string
  role: Role
  teamId: number | null
  teamName: string | null
  expiresAt: string
  invitedBy: string | null
}

export interface TeamDetail {
  team: { id: number; name: string; number: string | null; colour: string }
  members: TeamMember[]
  /** E-mail addresses only for those who manage people. */
  mentors: { userId: number; name: string; email: string | null }[]
  /** Only for those who manage people; empty for everyone else. */
  invitations: PendingInvitation[]
  can: Can<'team.manage' | 'people.manage'>
}

export interface Person {
  id: number
  name: string
  email: string
  active: boolean
  isMentor: boolean
  lastSignInAt: string | null
  memberships: { teamId: number; teamName: string; role: MemberRole }[]
}

export interface InvitationPreview {
  email: string
  name: string
  role: Role
  teamName: string | null
  programName: string
}

export interface ResetPreview {
  email: string
  purpose: 'reset' | 'welcome'
}

export interface SignedIn {
  /** Where to go next. */
  home: string
}

export interface AuditEntry {
  id: number
  at: string
  action: AuditAction
  actor: { id: number; name: string } | null
  subjectType: AuditSubject
  subjectId: string | null
  detail: Record<string, unknown>
}

export interface MailSummary {
  id: string
  date: string
  from: string
  to: string
  subject: string
}

export interface MailMessage extends MailSummary {
  text: string
  html: string | null
}

/** A message of the program's outbox that could not be delivered yet. */
export interface OutboxProblem {
  id: number
  to: string
  subject: string
  attempts: number
  lastError: string
  nextAttemptAt: string
  createdAt: string
}

/** Mail the program has written that has not gone out: how many wait, and those that failed. */
export interface OutboxStatus {
  waiting: number
  failing: OutboxProblem[]
}

/**
 * Error bodies: h3's createError JSON. For invalid input, statusCode 400 and
 * data.fieldErrors maps a field name to its messages, so a form can show them inline.
 */
export interface ApiErrorBody {
  statusCode: number
  statusMessage?: string
  message: string
  data?: { fieldErrors?: Record<string, string[]> }
}

/** One line of the history of an artwork, a robot or a job. */
export interface HistoryEntry {
  id: number
  at: string
  action: AuditAction
  by: string | null
  subjectType: AuditSubject
  subjectId: string | null
  detail: Record<string, unknown>
}

/** What waits for a mentor on the Program page. */
export interface ProgramWaiting {
  /** Revisions submitted and not yet decided. */
  toReview: number
  jobsQueued: number
  /** Queued jobs that cannot be cut as things stand, each with the reason in words. */
  jobsBlocked: { jobId: number; title: string; robot: string; reason: string }[]
  /** Usable films with few sheets left, or fewer than the queued jobs need. */
  filmsLow: { filmId: number; name: string; onHand: number; needed: number }[]
  /** Robots with no decal placed on them. */
  robotsBare: { robotId: number; name: string; team: string }[]
}
