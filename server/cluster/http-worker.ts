import type { AppConfig } from '../config'
import type { CaughtMail, Mailbox } from '../modules/mail/mail-catcher'
import { startStipple, type RunningStipple } from '../start'
import { IpcLocker } from './ipc-locker'
import { isStippleMessage, type Channel, type ToPrimary, type ToWorker } from './messages'

/** The worker's end of the IPC channel to the primary. */
function primaryChannel(): Channel<ToPrimary, ToWorker> {
  return {
    send: (message) => {
      if (process.connected) process.send?.(message)
    },
    onMessage: (listener) =>
      process.on('message', (message) => {
        if (isStippleMessage<ToWorker>(message)) listener(message)
      }),
  }
}

/** The caught mail lives in the primary, which runs the catcher; the page asks it for the list. */
function primaryMailbox(channel: Channel<ToPrimary, ToWorker>): Mailbox {
  let asks = 0
  const waiting = new Map<number, (items: CaughtMail[]) => void>()
  channel.onMessage((message) => {
    if (message.stipple !== 'mail-list') return
    waiting.get(message.ask)?.(message.items)
    waiting.delete(message.ask)
  })
  return {
    list: () =>
      new Promise((resolve, reject) => {
        const ask = ++asks
        const timer = setTimeout(() => {
          waiting.delete(ask)
          reject(new Error('The primary process did not answer for the caught mail.'))
        }, 5000)
        waiting.set(ask, (items) => (clearTimeout(timer), resolve(items)))
        channel.send({ stipple: 'mail-list', ask })
      }),
  }
}

/**
 * One HTTP worker of a multi-process Stipple: the whole web application, with the jobs, the
 * caught mail and the upload locks handed to the primary. It tells the primary when it listens.
 */
export async function startHttpWorker(
  config: AppConfig,
  options: { clientDir?: string } = {},
): Promise<RunningStipple> {
  const channel = primaryChannel()
  const stipple = await startStipple(config, {
    ...options,
    primary: {
      jobs: { notify: () => channel.send({ stipple: 'jobs-notify' }) },
      mailbox: config.demo ? primaryMailbox(channel) : null,
      uploadLocker: new IpcLocker(channel),
    },
  })
  channel.send({ stipple: 'listening', url: stipple.url })
  return stipple
}
