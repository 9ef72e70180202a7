// `npm run dev`: the API (restarting on change) and Vite's dev server side by side. The browser
// talks to Vite on :5173, which proxies /api, /auth, /oidc and /idp to the API on :3000, so the
// public URL (and the identity provider's redirect address) is Vite's.
import { spawn } from 'node:child_process'

const env = {
  ...process.env,
  PORT: '3000',
  PUBLIC_URL: process.env.PUBLIC_URL ?? 'http://localhost:5173',
}
const children = [
  spawn(process.execPath, ['node_modules/tsx/dist/cli.mjs', 'watch', 'server/main.ts'], {
    stdio: 'inherit',
    env,
  }),
  spawn(process.execPath, ['node_modules/vite/bin/vite.js'], { stdio: 'inherit', env }),
]
const stop = () => children.forEach((c) => c.kill('SIGTERM'))
process.on('SIGINT', stop)
process.on('SIGTERM', stop)
for (const child of children)
  child.on('exit', (code) => {
    stop()
    process.exitCode = code ?? 0
  })
