/**
 * Reads whole columns of a store's Arrow file straight from disk into one array per column.
 *
 * Building an Arrow table first (read the file, then concatenate each column's batches) touches
 * every byte twice in freshly allocated memory, and first touches of memory are what a large read
 * costs here (≈3 ms per MB, against ≈0.04 ms to copy). So this reads the footer and each batch's
 * metadata (small) with apache-arrow's own decoders, then reads each column's values of each batch
 * into its place in the result. It handles what our writer writes (uncompressed primitive
 * columns without nulls) and answers null for anything else, so the caller can take the general
 * path.
 */
import { readSync } from 'node:fs'
import { open, type FileHandle } from 'node:fs/promises'
import { Message, MessageHeader, type Field } from 'apache-arrow'
import { Footer } from 'apache-arrow/ipc/metadata/file'
import type { RecordBatch as BatchMetadata } from 'apache-arrow/ipc/metadata/message'

/** The file's last bytes: footer length (int32), then the magic "ARROW1". */
const TRAILER_BYTES = 10
/** A message starts with the continuation marker and its metadata length, 4 bytes each. */
const MESSAGE_PREFIX_BYTES = 8

export type ColumnArray = Float64Array | Float32Array | Uint32Array | Uint16Array | Uint8Array

type MakeColumn = (buffer: ArrayBufferLike, length: number) => ColumnArray

const PRIMITIVES: Record<string, MakeColumn> = {
  Float64: (b, n) => new Float64Array(b, 0, n),
  Float32: (b, n) => new Float32Array(b, 0, n),
  Uint32: (b, n) => new Uint32Array(b, 0, n),
  Uint16: (b, n) => new Uint16Array(b, 0, n),
  Uint8: (b, n) => new Uint8Array(b, 0, n),
}
const BYTES: Record<string, number> = { Float64: 8, Float32: 4, Uint32: 4, Uint16: 2, Uint8: 1 }

async function readAt(file: FileHandle, position: number, length: number): Promise<Uint8Array> {
  const bytes = new Uint8Array(length)
  await readInto(file, bytes, 0, length, position)
  return bytes
}

async function readFooter(file: FileHandle) {
  const { size } = await file.stat()
  const trailer = await readAt(file, size - TRAILER_BYTES, 4)
  const footerLength = new DataView(trailer.buffer).getInt32(0, true)
  return Footer.decode(await readAt(file, size - TRAILER_BYTES - footerLength, footerLength))
}

/** Where each record batch's column values lie in the file, decoded once from its metadata. */
export interface StoreLayout {
  fields: Field[]
  bytesPerValue: number[]
  make: MakeColumn[]
  batches: { rows: number; valuesAt: number[] }[]
}

/**
 * The layout of a store file written as our writer writes it (uncompressed primitive columns
 * without nulls); null for anything else.
 */
export async function readStoreLayout(file: FileHandle): Promise<StoreLayout | null> {
  const footer = await readFooter(file)
  const fields = footer.schema.fields
  if (fields.some((f) => !PRIMITIVES[String(f.type)])) return null
  const batches: StoreLayout['batches'] = []
  for (const block of footer.recordBatches()) {
    const prefix = MESSAGE_PREFIX_BYTES
    const bytes = await readAt(file, block.offset + prefix, block.metaDataLength - prefix)
    const message = Message.decode(bytes)
    if (message.headerType !== MessageHeader.RecordBatch) return null
    const metadata = message.header() as BatchMetadata
    const plain = !metadata.compression && metadata.buffers.length === fields.length * 2
    if (!plain || metadata.nodes.some((n) => n.nullCount > 0)) return null
    const body = block.offset + block.metaDataLength
    const valuesAt = fields.map((field, c) => {
      const region = metadata.buffers[2 * c + 1]!
      const needed = metadata.length * BYTES[String(field.type)]!
      return region.length < needed ? -1 : body + region.offset
    })
    if (valuesAt.includes(-1)) return null
    batches.push({ rows: metadata.length, valuesAt })
  }
  return {
    fields,
    bytesPerValue: fields.map((f) => BYTES[String(f.type)]!),
    make: fields.map((f) => PRIMITIVES[String(f.type)]!),
    batches,
  }
}

/** Reads `length` bytes at `position` into `target` from `offset` on. */
export async function readInto(
  file: FileHandle,
  target: Uint8Array,
  offset: number,
  length: number,
  position: number,
) {
  for (let done = 0; done < length;) {
    const { bytesRead } = await file.read(target, offset + done, length - done, position + done)
    if (bytesRead === 0) throw new Error('The localization store ends early.')
    done += bytesRead
  }
}

/**
 * The same read, synchronous: for threads that have nothing else to do meanwhile (tile threads,
 * job threads), where a read from the page cache is quicker than libuv's thread-pool round trip.
 */
export function readIntoSync(
  fd: number,
  target: Uint8Array,
  offset: number,
  length: number,
  position: number,
) {
  for (let done = 0; done < length;) {
    const read = readSync(fd, target, offset + done, length - done, position + done)
    if (read === 0) throw new Error('The localization store ends early.')
    done += read
  }
}

/**
 * Touches one byte of every page. On this kind of virtual machine the first touch from JavaScript
 * of a page that the kernel has just filled by a read still costs ≈2 µs (measured: 40 MB read
 * into fresh memory, then one byte per page read: 80–100 ms the first time, 0.4 ms the second).
 * Paid here, while loading, it does not land inside whichever computation reads the column first.
 */
function makeResident(bytes: Uint8Array) {
  let sum = 0
  for (let i = 0; i < bytes.length; i += 4096) sum += bytes[i]!
  return sum
}

/**
 * The columns `wanted` picks, whole, each in one array; null when the file holds something this
 * reader does not handle. (Not on SharedArrayBuffers: V8 reads those markedly slower, ≈30 % over
 * a whole report here.) Its reads are synchronous: every caller runs in a thread of its own (job,
 * tile and FRC threads), and a store holds a batch per store tile, thousands of reads in all.
 */
export async function readStoreColumns(arrowPath: string, wanted: (field: Field) => boolean) {
  const file = await open(arrowPath, 'r')
  try {
    const layout = await readStoreLayout(file)
    if (!layout) return null
    const count = layout.batches.reduce((n, b) => n + b.rows, 0)
    const columns = new Map<Field, ColumnArray>()
    for (const [c, field] of layout.fields.entries()) {
      if (!wanted(field)) continue
      const memory = new ArrayBuffer(count * layout.bytesPerValue[c]!)
      const target = new Uint8Array(memory)
      let offset = 0
      for (const batch of layout.batches) {
        const length = batch.rows * layout.bytesPerValue[c]!
        readIntoSync(file.fd, target, offset, length, batch.valuesAt[c]!)
        offset += length
      }
      makeResident(target)
      columns.set(field, layout.make[c]!(memory, count))
    }
    return { count, columns }
  } finally {
    await file.close()
  }
}
