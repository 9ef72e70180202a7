/**
 * One ingest in a process of its own, so its peak RSS is the ingest's: sniffs the table, takes the
 * suggested mapping, ingests, then prints `RESULT {json}` with the wall time, CPU time and peak
 * RSS (taken before a second, warm ingest).
 * usage: tsx tests/bench/ingest-child.ts <table> <output.arrow> [--once]
 * (`--once`: no warm run, for tables too large to convert twice in a benchmark.)
 */
import { ingestLocalizationTable, sniffTable } from '@server/compute/ingest'
import { suggestMapping } from '@shared/domain/localization-columns'
import { mappingFromSuggestion } from '@shared/schemas/localization-mapping.schema'

const [sourcePath, outputPath, once] = process.argv.slice(2)
if (!sourcePath || !outputPath) throw new Error('usage: ingest-child.ts <table> <output.arrow>')

const sniff = await sniffTable(sourcePath)
const mapping = mappingFromSuggestion(suggestMapping(sniff.header, sniff.sampleRows))
if (!mapping) throw new Error(`no confident mapping for ${sniff.header.join(', ')}`)

const cpuSeconds = () => {
  const usage = process.resourceUsage()
  return (usage.userCPUTime + usage.systemCPUTime) / 1e6
}

const cpuBefore = cpuSeconds()
const started = performance.now()
const report = await ingestLocalizationTable({ sourcePath, outputPath, mapping })
const seconds = (performance.now() - started) / 1000
const cpu = cpuSeconds() - cpuBefore
const peakRssMB = process.resourceUsage().maxRSS / 1024

// Once more in the same process: the parse workers are started already, as in a running server.
const warmCpuBefore = cpuSeconds()
const warmStarted = performance.now()
if (once !== '--once')
  await ingestLocalizationTable({ sourcePath, outputPath: `${outputPath}.warm`, mapping })
const warmSeconds = (performance.now() - warmStarted) / 1000
const warmCpuSeconds = cpuSeconds() - warmCpuBefore

const result = {
  seconds,
  cpuSeconds: cpu,
  warmSeconds,
  warmCpuSeconds,
  peakRssMB,
  rowsAccepted: report.rowsAccepted,
  rowsRejected: report.rowsRejected,
  outputBytes: report.output.bytes,
  recordBatches: report.output.recordBatches,
  spilledBytes: report.output.spilledBytes,
  phaseSeconds: report.phaseSeconds,
}
process.stdout.write(`RESULT ${JSON.stringify(result)}\n`)
