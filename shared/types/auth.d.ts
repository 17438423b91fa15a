// The sealed session cookie holds who signed in and the id of their session row; roles are
// read from the database on every request, and the session row is checked, so a change of
// role, a deactivation or an ended session takes effect at once.
declare module '#auth-utils' {
  interface User {
    id: number
  }
  interface UserSession {
    signedInAt: number
  }
  interface SecureSessionData {
    sid: string
  }
}
export {}
