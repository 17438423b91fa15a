import type { Action } from '#shared/types/policy'

declare module '#app' {
  interface PageMeta {
    /** The work the page is for; only those who may do it open the page. Omit for "any signed-in person". */
    can?: Action
    /** The page exists only while the local mail fake is in use. */
    mailFake?: boolean
  }
}

export {}
