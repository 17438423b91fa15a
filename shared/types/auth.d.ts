// The sealed session cookie holds only who signed in; roles are read from the database
// on every request so that a change of role or a deactivation takes effect at once.
declare module '#auth-utils' {
  interface User {
    id: number
  }
  interface UserSession {
    signedInAt: number
  }
}
export {}
