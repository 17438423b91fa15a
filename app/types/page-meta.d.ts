import type { Role } from '#shared/types/roles'

declare module '#app' {
  interface PageMeta {
    /** Roles that may open the page; mentors may open every page. Omit for "any signed-in person". */
    roles?: Role[]
    /** The page exists only while the local mail fake is in use. */
    mailFake?: boolean
  }
}

export {}
