import { ROLE_LABELS } from '#shared/types/roles'

export function roleLabel(role: string | null | undefined): string {
  if (!role) return ''
  return (ROLE_LABELS as Record<string, string>)[role] ?? role
}

/** Name plus number, e.g. "Copper Crows (4410)", wherever a team is named in running text. */
export function teamLabel(team: { name: string; number: string | null }): string {
  return team.number ? `${team.name} (${team.number})` : team.name
}

export function plural(n: number, one: string, many = `${one}s`): string {
  return `${n} ${n === 1 ? one : many}`
}
