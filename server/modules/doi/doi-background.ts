import type { AppConfig } from '../../config'
import type { Orm } from '../../db'
import type { Logger } from '../../logger'
import { createMailer, type Mailer } from '../mail/mailer'
import { DoiRegistrar } from './doi-registrar'
import { startFakeDataCite, type FakeDataCite } from './fake-datacite/fake-datacite'

/**
 * Starts DOI registration for the background process: against DATACITE_URL when set, else (demo
 * mode) against the local DataCite stand-in started here. Without either, versions keep their
 * DOI pending and the registrar does not run.
 */
export async function startDoiRegistration(deps: {
  config: AppConfig
  orm: Orm
  logger: Logger
  smtpUrl: string | null
}): Promise<{ registrar: DoiRegistrar | null; stop(): Promise<void> }> {
  const { config, orm, logger } = deps
  let fake: FakeDataCite | null = null
  let url = config.datacite.url
  if (!url && config.demo) {
    fake = await startFakeDataCite(config.datacite)
    url = fake.url
    logger.info({ url }, 'local DataCite stand-in started')
  }
  if (!url) return { registrar: null, stop: async () => {} }
  const mailer: Mailer = deps.smtpUrl
    ? createMailer(deps.smtpUrl, config.mailFrom, logger)
    : { send: async () => {} }
  const registrar = new DoiRegistrar({ orm, config, logger, mailer, url })
  registrar.start()
  return {
    registrar,
    async stop() {
      await registrar.stop()
      await fake?.stop()
    },
  }
}
