/** Roles held through membership of a team. */
export const MEMBER_ROLES = ['student', 'designer', 'operator'] as const
export type MemberRole = (typeof MEMBER_ROLES)[number]

/** Every role a person can be invited with; a mentor belongs to the whole program. */
export const ROLES = ['student', 'designer', 'operator', 'mentor'] as const
export type Role = (typeof ROLES)[number]

export const ROLE_LABELS: Record<Role, string> = {
  student: 'Student',
  designer: 'Designer',
  operator: 'Operator',
  mentor: 'Mentor',
}

export const ROLE_DESCRIPTIONS: Record<Role, string> = {
  student: 'Uploads drawings, submits them for review, asks for reprints.',
  designer: 'Everything a student does, plus tuning outlines and physical size.',
  operator: 'Trained on the laser: works the cut queue and records cut and applied.',
  mentor: 'Runs the program: teams, people, robots, film stock and approvals.',
}
