import sanitize from 'sanitize-filename'

export class FileNameError extends Error {}

/**
 * Invisible characters: controls, line and paragraph separators, and Unicode's format characters
 * (bidirectional overrides and isolates, zero-width spaces and joiners, the BOM, soft hyphens, tag
 * characters). A right-to-left override makes `…gnp.exe` display as `exe.png`.
 */
const INVISIBLE = /[\p{Cc}\p{Cf}\u2028\u2029]/gu

/**
 * A deposited file's name, safe to show, to put in manifests and archives, and never a path:
 * Unicode NFC, the last path segment only (so `../../etc/passwd` becomes `passwd`), no invisible,
 * control or reserved characters (sanitize-filename), at most 200 characters with the extension kept.
 */
export function safeFileName(input: string): string {
  const visible = input.normalize('NFC').replace(INVISIBLE, '')
  const lastSegment = visible.replace(/\\/g, '/').split('/').pop() ?? ''
  let name = sanitize(lastSegment.replace(/\s+/g, ' ').trim()).replace(/^\.+/, '').trim()
  if (!name) throw new FileNameError(`"${input}" is not a usable file name.`)
  if (name.length > 200) {
    const dot = name.lastIndexOf('.')
    const ext = dot > 0 && name.length - dot <= 16 ? name.slice(dot) : ''
    name = name.slice(0, 200 - ext.length) + ext
  }
  return name
}
