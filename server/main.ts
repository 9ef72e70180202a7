import cluster from 'node:cluster'
import { startHttpWorker } from './cluster/http-worker'
import { startPrimary } from './cluster/primary'
import { ConfigError, loadConfig, type AppConfig } from './config'
import type { DemoAccount } from './modules/idp/accounts'
import { createLogger } from './logger'
import { CLIENT_DIR } from './paths'
import { startStipple } from './start'
import { StartupError, waitForDependencies } from './startup/dependencies'

function banner(url: string, config: AppConfig, accounts: DemoAccount[]) {
  const lines = [``, `Stipple is running at ${url}`, ``]
  if (config.httpWorkers > 1) lines.splice(2, 0, `  (${config.httpWorkers} HTTP worker processes)`)
  if (config.demo) {
    lines.push('Demo sign-ins (local identity provider):')
    for (const a of accounts)
      lines.push(`  ${a.role.padEnd(13)} ${a.email.padEnd(40)} ${a.password}`)
    lines.push('', `Caught mail: ${url}/admin/mail (as admin)`, `API docs:    ${url}/api/docs`, '')
  }
  process.stdout.write(lines.join('\n') + '\n')
}

/** Stops on SIGINT/SIGTERM (and, in an HTTP worker, when the primary is gone). */
function stopOnSignals(running: {
  stop(): Promise<void>
  logger: { info(o: object, m: string): void }
}) {
  const shutdown = async (signal: string) => {
    running.logger.info({ signal }, 'shutting down')
    await running.stop()
    process.exit(0)
  }
  process.once('SIGINT', () => void shutdown('SIGINT'))
  process.once('SIGTERM', () => void shutdown('SIGTERM'))
  if (cluster.isWorker) process.once('disconnect', () => void shutdown('disconnect'))
}

async function main() {
  const config = loadConfig()
  // Before the port opens: a node whose database or object store never answers exits instead of
  // serving errors (a worker's primary has waited already).
  if (!cluster.isWorker) await waitForDependencies(config, createLogger(config.logLevel))
  if (cluster.isWorker) {
    // The primary prints the banner; a worker only serves.
    stopOnSignals(await startHttpWorker(config, { clientDir: CLIENT_DIR }))
  } else if (config.httpWorkers > 1) {
    const primary = await startPrimary(config)
    banner(primary.url, config, primary.accounts)
    stopOnSignals(primary)
  } else {
    const stipple = await startStipple(config, { clientDir: CLIENT_DIR })
    banner(stipple.url, stipple.config, stipple.accounts)
    stopOnSignals(stipple)
  }
}

main().catch((err: unknown) => {
  process.stderr.write(
    `${err instanceof ConfigError || err instanceof StartupError ? err.message : err instanceof Error ? (err.stack ?? err.message) : String(err)}\n`,
  )
  process.exit(1)
})
