/** `npm run build:wasm`: compiles the WebAssembly modules from their AssemblyScript sources. */
import { writeFile } from 'node:fs/promises'
import { fileURLToPath } from 'node:url'
import { buildPlainRowsModule, PLAIN_ROWS_MODULE } from './wasm-modules'

await writeFile(fileURLToPath(PLAIN_ROWS_MODULE), await buildPlainRowsModule())
console.log(`wrote ${fileURLToPath(PLAIN_ROWS_MODULE)}`)
