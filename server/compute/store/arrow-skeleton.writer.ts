/**
 * Lays out the Arrow IPC file before its column data exists. The library's file writer writes the
 * schema, one record batch per tile and the footer; the batches' column buffers are placeholders
 * (views of one zeroed array per column), and where such a view would be written we only note the
 * file offset, leaving a hole. The columns are written into the holes afterwards, straight from
 * the parsed chunks (batch.writer.ts), so no second copy of the table is needed.
 */
import type { FileHandle } from 'node:fs/promises'
import { makeData, RecordBatch, RecordBatchFileWriter, Struct, type Schema } from 'apache-arrow'
import { viewOf, BYTES_PER_VALUE, type OutputArray, type OutputKind } from './store-columns'

export interface ArrowSkeleton {
  /** holes[column][batch]: file offset of that column's values in that batch. */
  holes: number[][]
  bytes: number
}

export async function writeArrowSkeleton(
  file: FileHandle,
  schema: Schema,
  kinds: OutputKind[],
  batchRows: number[],
): Promise<ArrowSkeleton> {
  const largest = Math.max(1, ...batchRows)
  const placeholders = kinds.map((k) =>
    viewOf(k, new ArrayBuffer(largest * BYTES_PER_VALUE[k]), largest),
  )
  const writer = new RecordBatchFileWriter().reset(undefined, schema)
  const written = recordLayout(writer, file, placeholders)
  for (const rows of batchRows) writer.write(placeholderBatch(schema, placeholders, rows))
  writer.finish()
  writer.close()
  const skeleton = await written
  const complete = skeleton.holes.every((h) => h.length === batchRows.length)
  if (!complete)
    throw new Error('The Arrow writer copied a column buffer; the file layout is unknown')
  return skeleton
}

function placeholderBatch(schema: Schema, placeholders: OutputArray[], rows: number) {
  const children = schema.fields.map((field, c) =>
    makeData({
      type: field.type,
      data: placeholders[c]!.subarray(0, rows),
      length: rows,
      nullCount: 0,
    }),
  )
  return new RecordBatch(
    schema,
    makeData({ type: new Struct(schema.fields), length: rows, nullCount: 0, children }),
  )
}

/**
 * Writes what the writer emits, except placeholder views, whose offsets it notes instead. The
 * pieces between holes are small; they are written together at the end, all at once.
 */
async function recordLayout(
  writer: RecordBatchFileWriter,
  file: FileHandle,
  placeholders: OutputArray[],
) {
  const holes: number[][] = placeholders.map(() => [])
  const runs: { start: number; pieces: Uint8Array[] }[] = []
  let open = false
  let position = 0
  for await (const piece of writer) {
    const column = placeholders.findIndex((p) => p.buffer === piece.buffer)
    if (column >= 0) holes[column]!.push(position)
    else if (open) runs.at(-1)!.pieces.push(piece)
    else runs.push({ start: position, pieces: [piece] })
    open = column < 0
    position += piece.byteLength
  }
  await Promise.all(runs.map((run) => file.writev(run.pieces, run.start)))
  return { holes, bytes: position }
}
