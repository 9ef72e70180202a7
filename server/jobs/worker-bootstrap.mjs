// A worker thread does not inherit the main thread's TypeScript loader: register tsx, then load
// the worker itself.
import { register } from 'tsx/esm/api'

register()
await import('./worker.ts')
