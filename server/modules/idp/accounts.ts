import { createHash, timingSafeEqual } from 'node:crypto'
import { readFileSync } from 'node:fs'
import { z } from 'zod'

/** Roles of the demo accounts: a site role, or the part the person plays in the demo projects. */
export const DEMO_ROLES = [
  'admin',
  'steward',
  'editor',
  'owner',
  'depositor',
  'collaborator',
] as const

export const accountFileSchema = z.array(
  z.object({
    email: z.email(),
    password: z.string().min(8),
    name: z.string().min(1),
    role: z.enum(DEMO_ROLES),
  }),
)
export type DemoAccount = z.infer<typeof accountFileSchema>[number] & { sub: string }

/** A stable opaque subject per account, as a real provider would issue. */
export const subjectFor = (email: string) =>
  `acct-${createHash('sha256').update(email.toLowerCase()).digest('hex').slice(0, 16)}`

export function loadAccounts(file: string): DemoAccount[] {
  const parsed = accountFileSchema.parse(JSON.parse(readFileSync(file, 'utf8')))
  return parsed.map((a) => ({ ...a, email: a.email.toLowerCase(), sub: subjectFor(a.email) }))
}

const digest = (s: string) => createHash('sha256').update(s, 'utf8').digest()

/** Constant-time comparison of a typed password with the account's. */
export function checkPassword(account: DemoAccount, password: string): boolean {
  return timingSafeEqual(digest(account.password), digest(password))
}
