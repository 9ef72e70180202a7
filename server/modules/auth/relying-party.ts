import * as oidc from 'openid-client'

export interface RelyingPartyOptions {
  issuer: string
  clientId: string
  clientSecret: string
  publicUrl: string
}

export interface RelyingParty {
  readonly redirectUri: string
  readonly postLogoutRedirectUri: string
  configuration(): Promise<oidc.Configuration>
}

/**
 * Stipple as an OpenID Connect client of any provider (the local stand-in or an institution's).
 * Discovery runs on first use and is cached; a failed discovery is retried on the next sign-in.
 */
export function createRelyingParty(options: RelyingPartyOptions): RelyingParty {
  let discovered: Promise<oidc.Configuration> | null = null
  const insecure = options.issuer.startsWith('http://')
  return {
    redirectUri: `${options.publicUrl}/auth/callback`,
    postLogoutRedirectUri: `${options.publicUrl}/`,
    configuration() {
      discovered ??= oidc
        .discovery(new URL(options.issuer), options.clientId, options.clientSecret, undefined, {
          // Plain http is only ever the local stand-in on loopback; real providers use https.
          execute: insecure ? [oidc.allowInsecureRequests] : [],
        })
        .catch((err: unknown) => {
          discovered = null
          throw err
        })
      return discovered
    },
  }
}
