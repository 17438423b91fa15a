// One guard for every route: signed-out people reach only the public pages, and a page that
// names its work in definePageMeta ({ can }) sends anyone the server says may not do it to
// their own start page, where the shell says why.
export default defineNuxtRouteMiddleware(async (to) => {
  const session = useSessionStore()
  const open = isPublicPath(to.path)

  if (!session.loaded) {
    try {
      await session.load()
    } catch (err) {
      // Public pages work without knowing who is signed in.
      if (!open) {
        const p = apiProblem(err)
        return abortNavigation(createError({
          statusCode: p.status >= 500 || p.status === 0 ? 503 : p.status,
          statusMessage: 'Unavailable',
          message: 'Decalwright could not check who is signed in. Try again in a moment.',
          fatal: true,
        }))
      }
    }
  }

  const me = session.me

  if (open) {
    // Someone already signed in has no use for the sign-in form.
    if (to.path === '/sign-in' && me) return navigateTo(safeNext(to.query.next) ?? me.home, { replace: true })
    return
  }

  if (!me) {
    const query = to.fullPath === '/' ? {} : { next: to.fullPath }
    return navigateTo({ path: '/sign-in', query }, { replace: true })
  }

  if (to.path === '/') return navigateTo(me.home, { replace: true })

  if (to.meta.mailFake && !me.mailFake) {
    return abortNavigation(createError({ statusCode: 404, statusMessage: 'Not found', message: 'This page exists only while the local mail fake is in use.' }))
  }

  // Never bounce someone away from their own start page, whatever it declares.
  if (!session.mayOpen(to.meta.can) && to.path !== me.home) {
    // The address names the refused page, so the start page can say why (a redirect made on
    // the server keeps it too).
    return navigateTo({ path: me.home, query: { refused: to.path } }, { replace: true })
  }
})
