import type { FileStatus } from '@shared/domain/files'

/** How many files a dataset holds and how many are ready, in words ("3 files, 2 ready"). */
export function fileCountText(files: readonly { status: FileStatus }[]): string {
  if (!files.length) return 'No files deposited'
  const ready = files.filter((f) => f.status === 'ready').length
  const noun = files.length === 1 ? 'file' : 'files'
  if (ready === files.length)
    return `${files.length} ${noun} deposited, ${files.length === 1 ? 'ready' : 'all ready'}`
  return `${files.length} ${noun} deposited, ${ready} ready`
}
