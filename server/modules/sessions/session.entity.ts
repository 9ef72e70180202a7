import { defineEntity, p, type InferEntity } from '@mikro-orm/core'

/** A server-side browser session (express-session store). */
export const Session = defineEntity({
  name: 'Session',
  properties: {
    sid: p.string().primary(),
    data: p.json<Record<string, unknown>>(),
    expiresAt: p.datetime().index(),
  },
})
export type ISession = InferEntity<typeof Session>
