import type { AppAbility } from '@shared/permissions/abilities'
import type { Viewer } from '@shared/permissions/viewer'
import type { CurrentUser } from '../http/authenticate'

declare global {
  namespace Express {
    interface Request {
      /** Who is asking (null when signed out), as the abilities see them. */
      viewer: Viewer | null
      user: CurrentUser | null
      ability: AppAbility
      authMethod: 'session' | 'token' | null
      /** The database's access version when this request began (see AccessVersionReader). */
      accessVersion: number
    }
  }
}

declare module 'express-session' {
  interface SessionData {
    userId?: number
    idToken?: string
    /** A sign-in in progress: kept until the callback uses it once. */
    pendingSignIn?: { state: string; nonce: string; verifier: string; returnTo: string }
  }
}

export {}
