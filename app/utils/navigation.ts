import type { Me } from '#shared/types/api'
import type { Action } from '#shared/types/policy'

export interface NavItem { label: string; to: string; test: string }

/**
 * The shell's navigation for one person: the day's work in the bar itself, and the program's
 * own pages (teams, people, films, materials, activity, mail) gathered under one "Program"
 * menu so the bar fits a phone. Each item shows for those the server says may do its work.
 */
export function navigation(me: Me): { work: NavItem[]; program: NavItem[] } {
  const can = (action: Action) => !!me.can[action]
  const work: NavItem[] = []
  if (can('revision.review')) work.push({ label: 'Reviews', to: '/reviews', test: 'reviews' })
  // The studio is where a team's own students and designers start.
  if (me.teams.some((t) => t.role !== 'mentor' && t.can['artwork.upload'])) work.push({ label: 'Studio', to: '/studio', test: 'studio' })
  if (can('artwork.upload')) work.push({ label: 'Artworks', to: '/artworks', test: 'artworks' })
  work.push({ label: 'Robots', to: '/robots', test: 'robots' })
  if (can('queue.work')) work.push({ label: 'Lab', to: '/lab', test: 'lab' })

  const program: NavItem[] = []
  if (can('program.manage')) program.push({ label: 'Overview', to: '/program', test: 'program' })
  program.push({ label: 'Teams', to: '/teams', test: 'teams' })
  if (can('program.manage')) program.push({ label: 'Competition rules', to: '/rules', test: 'rules' })
  if (can('people.manage')) program.push({ label: 'People', to: '/people', test: 'people' })
  program.push({ label: 'Films', to: '/films', test: 'films' }, { label: 'Materials', to: '/materials', test: 'materials' })
  if (can('audit.view')) program.push({ label: 'Activity', to: '/activity', test: 'activity' })
  if (can('mail.view') && me.mailFake) program.push({ label: 'Mail', to: '/mail', test: 'mail' })
  return { work, program }
}

/** Whether `path` is the item's page or one beneath it ("Teams" stays lit on a team's page). */
export function isUnder(path: string, to: string): boolean {
  return path === to || path.startsWith(`${to}/`)
}

// Who each kind of page is for, in the words the refusal sentence uses.
const AUDIENCE: Partial<Record<Action, string>> = {
  'program.manage': 'the program’s mentors',
  'people.manage': 'the program’s mentors',
  'team.manage': 'the program’s mentors',
  'film.manage': 'the program’s mentors',
  'audit.view': 'the program’s mentors',
  'revision.review': 'mentors, who approve or send back revisions',
  'queue.work': 'the lab’s operators',
  'film.test': 'the lab’s operators',
  'artwork.upload': 'team members who upload drawings',
  'artwork.revise': 'a team’s designers and mentors',
  'mail.view': 'people signed in while the local mail fake is in use',
}

/** The sentence a person reads on their start page after opening a page their roles do not reach. */
export function refusalSentence(action: Action | undefined): string {
  const who = (action && AUDIENCE[action]) ?? 'other roles'
  return `The page you opened is for ${who}, and your account does not hold that role, so Decalwright brought you to your own start page instead. Ask a mentor if you need it.`
}
