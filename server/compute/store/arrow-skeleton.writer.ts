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

/** The skeleton and the bytes between its holes: each run starts at `start` in the file. */
export interface ArrowLayout extends ArrowSkeleton {
  runs: { start: number; pieces: Uint8Array[] }[]
}

/** The file's layout, nothing written: for a writer that writes the file front to back. */
export async function layoutArrowFile(
  schema: Schema,
  kinds: OutputKind[],
  batchRows: number[],
): Promise<ArrowLayout> {
  const largest = Math.max(1, ...batchRows)
  const placeholders = kinds.map((k) =>
    viewOf(k, new ArrayBuffer(largest * BYTES_PER_VALUE[k]), largest),
  )
  const writer = new RecordBatchFileWriter().reset(undefined, schema)
  const recorded = recordLayout(writer, placeholders)
  for (const rows of batchRows) writer.write(placeholderBatch(schema, placeholders, rows))
  writer.finish()
  writer.close()
  const layout = await recorded
  const complete = layout.holes.every((h) => h.length === batchRows.length)
  if (!complete)
    throw new Error('The Arrow writer copied a column buffer; the file layout is unknown')
  return layout
}

/** Writes the bytes between the holes; the columns go into the holes afterwards. */
export async function writeArrowSkeleton(
  file: FileHandle,
  schema: Schema,
  kinds: OutputKind[],
  batchRows: number[],
): Promise<ArrowSkeleton> {
  const { holes, bytes, runs } = await layoutArrowFile(schema, kinds, batchRows)
  // The pieces between holes are small: written together, all at once.
  await Promise.all(runs.map((run) => file.writev(run.pieces, run.start)))
  return { holes, bytes }
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

/** Notes what the writer emits: placeholder views as holes (their offsets), the rest as runs. */
async function recordLayout(
  writer: RecordBatchFileWriter,
  placeholders: OutputArray[],
): Promise<ArrowLayout> {
  const holes: number[][] = placeholders.map(() => [])
  const runs: ArrowLayout['runs'] = []
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
  return { holes, bytes: position, runs }
}
