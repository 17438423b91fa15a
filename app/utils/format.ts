import { ROLE_LABELS } from '#shared/types/roles'

export function roleLabel(role: string | null | undefined): string {
  if (!role) return ''
  return (ROLE_LABELS as Record<string, string>)[role] ?? role
}

export function plural(n: number, one: string, many = `${one}s`): string {
  return `${n} ${n === 1 ? one : many}`
}
