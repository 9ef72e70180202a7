import { writeFileSync } from 'node:fs'
import { renderPermissionsMarkdown } from '../../shared/permissions/render-matrix'

writeFileSync(
  new URL('../../shared/permissions/PERMISSIONS.md', import.meta.url),
  renderPermissionsMarkdown(),
)
process.stdout.write('shared/permissions/PERMISSIONS.md written\n')
