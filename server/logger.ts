/** A tiny structured logger: one JSON line per event on stderr, filtered by level. */
export type LogLevel = 'silent' | 'error' | 'info' | 'debug'
const RANK: Record<LogLevel, number> = { silent: 0, error: 1, info: 2, debug: 3 }

export interface Logger {
  error(fields: Record<string, unknown>, message: string): void
  info(fields: Record<string, unknown>, message: string): void
  debug(fields: Record<string, unknown>, message: string): void
}

function serialise(fields: Record<string, unknown>) {
  const err = fields.err
  if (err instanceof Error) return { ...fields, err: { message: err.message, stack: err.stack } }
  return fields
}

export function createLogger(level: LogLevel): Logger {
  const write = (at: LogLevel) => (fields: Record<string, unknown>, message: string) => {
    if (RANK[at] > RANK[level]) return
    process.stderr.write(
      `${JSON.stringify({ time: new Date().toISOString(), level: at, message, ...serialise(fields) })}\n`,
    )
  }
  return { error: write('error'), info: write('info'), debug: write('debug') }
}
