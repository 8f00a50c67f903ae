import type { Role } from '../utils/enums'

declare module '#auth-utils' {
  interface User {
    id: string
    role: Role
    name: string
    email: string
    timeZone: string
  }
  interface UserSession {
    /** The user's session version when this cookie was sealed; a raised version ends the session. */
    sv?: number
    /** When the person signed in (ms since epoch): the absolute expiry counts from here. */
    issuedAt?: number
    /** Last time the session was seen (ms since epoch), refreshed every few minutes: the idle expiry. */
    seenAt?: number
    /** Password checked, second factor still to come: who, and until when (ms since epoch) the step may be taken. */
    pendingSecondFactor?: { userId: string, sv: number, until: number }
  }
}

export {}
