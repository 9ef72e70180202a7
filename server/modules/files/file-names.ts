import sanitize from 'sanitize-filename'

export class FileNameError extends Error {}

/**
 * A deposited file's name, safe to show, to put in manifests and archives, and never a path:
 * Unicode NFC, the last path segment only (so `../../etc/passwd` becomes `passwd`), no control or
 * reserved characters (sanitize-filename), at most 200 characters with the extension kept.
 */
export function safeFileName(input: string): string {
  const lastSegment = input.normalize('NFC').replace(/\\/g, '/').split('/').pop() ?? ''
  let name = sanitize(lastSegment.replace(/\s+/g, ' ').trim()).replace(/^\.+/, '').trim()
  if (!name) throw new FileNameError(`"${input}" is not a usable file name.`)
  if (name.length > 200) {
    const dot = name.lastIndexOf('.')
    const ext = dot > 0 && name.length - dot <= 16 ? name.slice(dot) : ''
    name = name.slice(0, 200 - ext.length) + ext
  }
  return name
}
