import { fileURLToPath } from 'node:url'

/** Folders shipped with the application, found relative to this file. */
export const DEMO_DIR = fileURLToPath(new URL('../demo-data', import.meta.url))
export const CLIENT_DIR = fileURLToPath(new URL('../dist/client', import.meta.url))
