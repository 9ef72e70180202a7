import { writeFileSync } from 'node:fs'
import { renderPermissionsMarkdown } from '../../shared/permissions/render-matrix'

writeFileSync(new URL('../../docs/permissions.md', import.meta.url), renderPermissionsMarkdown())
process.stdout.write('docs/permissions.md written\n')
