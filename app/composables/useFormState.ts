import type { ZodType, output } from 'zod'

/**
 * Shared form plumbing: pending flag, per-field errors and one form-level message,
 * filled the same way from the shared zod schemas and from the server's h3 errors.
 */
export function useFormState() {
  const route = useRoute()
  const session = useSessionStore()
  const pending = ref(false)
  const errors = ref<Record<string, string>>({})
  const formError = ref('')

  function clear() {
    errors.value = {}
    formError.value = ''
  }

  /** Checks input with a shared schema before sending; returns the parsed value or null. */
  function validate<S extends ZodType>(schema: S, input: unknown): output<S> | null {
    const result = schema.safeParse(input)
    if (result.success) return result.data
    const next: Record<string, string> = {}
    for (const issue of result.error.issues) {
      const field = String(issue.path[0] ?? '')
      if (field && !next[field]) next[field] = issue.message
      else if (!field && !formError.value) formError.value = issue.message
    }
    errors.value = next
    return null
  }

  function fail(err: unknown) {
    const p = apiProblem(err)
    errors.value = p.fieldErrors
    formError.value = p.message
    // A session that ended mid-task goes back through sign-in and returns here.
    if (p.status === 401 && !isPublicPath(route.path)) {
      session.me = null
      void navigateTo({ path: '/sign-in', query: { next: route.fullPath } })
    }
  }

  const key = submissionKey()

  /**
   * Runs one submission at a time; the callback does the success work, sending `headers` (the
   * submission's Idempotency-Key) with the request that creates something. Resolves true on success.
   */
  async function submit(work: (send: { headers: Record<string, string> }) => Promise<void>): Promise<boolean> {
    if (pending.value) return false
    pending.value = true
    try {
      await work({ headers: key.headers() })
      key.settled()
      return true
    } catch (err) {
      key.settled(err)
      fail(err)
      return false
    } finally {
      pending.value = false
    }
  }

  return { pending, errors, formError, clear, validate, fail, submit }
}
