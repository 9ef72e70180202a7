import { execFile } from 'node:child_process'
import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { promisify } from 'node:util'
import request from 'supertest'
import { afterAll, describe, expect, it } from 'vitest'
import { createApp } from '@server/app'
import { loadConfig } from '@server/config'
import { openDatabase } from '@server/db'
import { createLogger } from '@server/logger'
import { createRelyingParty } from '@server/modules/auth/relying-party'
import { User } from '@server/modules/users/user.entity'

const run = promisify(execFile)
const dataDir = mkdtempSync(join(tmpdir(), 'stipple-cli-'))
const admin = (...args: string[]) =>
  run(process.execPath, ['--import', 'tsx', 'server/cli/admin.ts', ...args], {
    env: { ...process.env, DATA_DIR: dataDir, LOG_LEVEL: 'silent' },
  })

afterAll(() => rmSync(dataDir, { recursive: true, force: true }))

describe('npm run admin', () => {
  it('adds a user with a site role, then creates a token the API accepts', async () => {
    const added = await admin(
      'user',
      'add',
      'Curator@Hub.test',
      '--name',
      'Hub Curator',
      '--site-role',
      'steward',
    )
    expect(added.stdout).toContain('Added curator@hub.test')
    const { stdout } = await admin('token', 'create', 'curator@hub.test', '--days', '7')
    const token = stdout.trim().split('\n').at(-1)!
    expect(token).toMatch(/^stp_/)

    const config = loadConfig({
      NODE_ENV: 'test',
      DATA_DIR: dataDir,
      LOG_LEVEL: 'silent',
      DEMO: 'false',
    })
    const orm = await openDatabase(config.dbPath)
    try {
      const user = await orm.em.fork().findOneOrFail(User, { email: 'curator@hub.test' })
      expect(user).toMatchObject({ name: 'Hub Curator', siteRole: 'steward' })
      const app = createApp({
        orm,
        config,
        logger: createLogger('silent'),
        mailer: { send: async () => undefined },
        relyingParty: createRelyingParty({
          issuer: 'http://127.0.0.1:9/oidc',
          clientId: 'x',
          clientSecret: 'y',
          publicUrl: config.publicUrl,
        }),
      })
      const me = await request(app).get('/api/me').set('Authorization', `Bearer ${token}`)
      expect(me.body.user).toMatchObject({ email: 'curator@hub.test', siteRole: 'steward' })
    } finally {
      await orm.close()
    }
  })

  it('fails with a clear message and a non-zero exit code', async () => {
    await expect(admin('token', 'create', 'nobody@hub.test')).rejects.toMatchObject({
      code: 1,
      stderr: expect.stringContaining('No user nobody@hub.test'),
    })
    await expect(
      admin('user', 'add', 'someone@hub.test', '--site-role', 'boss'),
    ).rejects.toMatchObject({
      stderr: expect.stringContaining('Use one of: admin, steward, editor'),
    })
  })
})
