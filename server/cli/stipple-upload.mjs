#!/usr/bin/env node
// The command-line uploader (npx stipple-upload …): registers the TypeScript loader, then runs it.
import { register } from 'tsx/esm/api'

register()
await import('./upload.ts')
