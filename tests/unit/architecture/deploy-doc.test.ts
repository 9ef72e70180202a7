import { readFileSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import { CONFIG_KEYS } from '@server/config'

const read = (path: string) => readFileSync(path, 'utf8')

/** The variables a file sets, by the pattern its format writes them in. */
const setIn = (text: string, pattern: RegExp) =>
  [...text.matchAll(pattern)].map((m) => m[1]!).filter((key) => !key.startsWith('POSTGRES_'))

describe('docs/deploy.md and the example files', () => {
  it('list every environment variable the configuration reads, in the table', () => {
    const doc = read('docs/deploy.md')
    const documented = new Set([...doc.matchAll(/^\| `([A-Z][A-Z0-9_]*)` +\|/gm)].map((m) => m[1]))
    const missing = CONFIG_KEYS.filter((key) => !documented.has(key))
    expect(missing, 'add these to the table in docs/deploy.md').toEqual([])
    const unknown = [...documented].filter((key) => !CONFIG_KEYS.includes(key!))
    expect(unknown, 'the table names variables the configuration does not read').toEqual([])
  })

  it('set only variables Stipple reads (a misspelt one would be ignored silently)', () => {
    const examples = [
      ...setIn(read('deploy/compose.yaml'), /^ {4}([A-Z][A-Z0-9_]*):/gm),
      ...setIn(read('deploy/stipple.service'), /^Environment=([A-Z][A-Z0-9_]*)=/gm),
      ...setIn(read('deploy/stipple.env.example'), /^([A-Z][A-Z0-9_]*)=/gm),
    ]
    expect(examples.length).toBeGreaterThan(10)
    expect(examples.filter((key) => !CONFIG_KEYS.includes(key))).toEqual([])
  })
})
