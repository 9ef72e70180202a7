import { ConfigError, loadConfig } from './config'
import { CLIENT_DIR } from './paths'
import { startStipple } from './start'

async function main() {
  const config = loadConfig()
  const stipple = await startStipple(config, { clientDir: CLIENT_DIR })
  const lines = [``, `Stipple is running at ${stipple.url}`, ``]
  if (stipple.config.demo) {
    lines.push('Demo sign-ins (local identity provider):')
    for (const a of stipple.accounts)
      lines.push(`  ${a.role.padEnd(13)} ${a.email.padEnd(40)} ${a.password}`)
    lines.push(
      '',
      `Caught mail: ${stipple.url}/admin/mail (as admin)`,
      `API docs:    ${stipple.url}/api/docs`,
      '',
    )
  }
  process.stdout.write(lines.join('\n') + '\n')

  const shutdown = async (signal: string) => {
    stipple.logger.info({ signal }, 'shutting down')
    await stipple.stop()
    process.exit(0)
  }
  process.once('SIGINT', () => void shutdown('SIGINT'))
  process.once('SIGTERM', () => void shutdown('SIGTERM'))
}

main().catch((err: unknown) => {
  process.stderr.write(
    `${err instanceof ConfigError ? err.message : err instanceof Error ? (err.stack ?? err.message) : String(err)}\n`,
  )
  process.exit(1)
})
