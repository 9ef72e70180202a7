// A pool thread does not inherit the main thread's TypeScript loader: register tsx, then load
// the worker itself and hand its entry to Piscina.
import { register } from 'tsx/esm/api'

register()
const worker = await import('./tile.worker.ts')
export default worker.default
