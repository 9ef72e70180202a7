import Provider, { type Configuration, type KoaContextWithOIDC } from 'oidc-provider'
import { escapeHtml, renderPage } from '../../http/html-page'
import type { Orm } from '../../db'
import type { DemoAccount } from './accounts'
import { sqliteAdapter } from './oidc-adapter'
import type { JWK } from 'jose'
import { signingKey } from './signing-key'

export interface LocalProviderOptions {
  issuer: string
  publicUrl: string
  clientId: string
  clientSecret: string
  accounts: DemoAccount[]
  dataDir: string
  cookieKeys: string[]
  /** The key to sign with; by default the one kept in dataDir (app nodes share theirs). */
  signingKey?: JWK
  /** Where the provider keeps its sessions, interactions, grants and codes. */
  orm: Orm
}

function setPage(ctx: KoaContextWithOIDC, title: string, body: string, scripts: string[] = []) {
  ctx.type = 'html'
  ctx.body = renderPage({ title, body, scripts })
}

/**
 * A stand-in for an institution's identity provider, on oidc-provider, with its own pages in
 * Stipple's look. It knows only the demo accounts; Stipple talks to it through discovery alone.
 */
export async function createLocalProvider(options: LocalProviderOptions): Promise<Provider> {
  const bySub = new Map(options.accounts.map((a) => [a.sub, a]))
  const configuration: Configuration = {
    adapter: sqliteAdapter(options.orm),
    clients: [
      {
        client_id: options.clientId,
        client_secret: options.clientSecret,
        client_name: 'Stipple',
        redirect_uris: [`${options.publicUrl}/auth/callback`],
        post_logout_redirect_uris: [`${options.publicUrl}/`],
        response_types: ['code'],
        grant_types: ['authorization_code'],
      },
    ],
    pkce: { required: () => true },
    cookies: { keys: options.cookieKeys },
    claims: { openid: ['sub'], email: ['email', 'email_verified'], profile: ['name'] },
    jwks: { keys: [options.signingKey ?? (await signingKey(options.dataDir))] },
    features: {
      devInteractions: { enabled: false },
      rpInitiatedLogout: {
        enabled: true,
        logoutSource: async (ctx, form) =>
          setPage(
            ctx,
            'Signing out',
            `<h1>Signing you out…</h1><p>You are leaving the demo identity provider.</p>${form}
<button type="submit" form="op.logoutForm" name="logout" value="yes" data-auto-submit autofocus>Sign out</button>`,
            ['/server-assets/auto-submit.js'],
          ),
        postLogoutSuccessSource: async (ctx) =>
          setPage(
            ctx,
            'Signed out',
            '<h1>You are signed out</h1><a class="button" href="/">Back to Stipple</a>',
          ),
      },
    },
    interactions: { url: (_ctx, interaction) => `/idp/interaction/${interaction.uid}` },
    findAccount: (_ctx, sub) => {
      const account = bySub.get(sub)
      if (!account) return undefined
      return {
        accountId: sub,
        claims: () => ({ sub, email: account.email, email_verified: true, name: account.name }),
      }
    },
    // Stipple is this provider's only, first-party client: grant its scopes without a consent page.
    loadExistingGrant: async (ctx) => {
      const grantId =
        ctx.oidc.result?.consent?.grantId || ctx.oidc.session!.grantIdFor(ctx.oidc.client!.clientId)
      if (grantId) return ctx.oidc.provider.Grant.find(grantId)
      const grant = new ctx.oidc.provider.Grant({
        clientId: ctx.oidc.client!.clientId,
        accountId: ctx.oidc.session!.accountId,
      })
      grant.addOIDCScope('openid email profile')
      await grant.save()
      return grant
    },
    renderError: async (ctx, out) =>
      setPage(
        ctx,
        'Sign-in problem',
        `<h1>Something went wrong at the identity provider</h1><p class="error">${escapeHtml(String(out.error_description ?? out.error))}</p><a class="button" href="/">Back to Stipple</a>`,
      ),
    ttl: {
      Session: 8 * 3600,
      Interaction: 3600,
      Grant: 8 * 3600,
      AccessToken: 600,
      AuthorizationCode: 60,
      IdToken: 3600,
    },
  }
  const provider = new Provider(options.issuer, configuration)
  return provider
}
