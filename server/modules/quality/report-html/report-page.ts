import { qualityCards, type QualityCard } from '@shared/domain/quality-cards'
import { lengthText, VERDICT_TONE_LABELS } from '@shared/domain/quality-verdicts'
import type { QualityReportDto } from '@shared/schemas/quality.schema'
import { html, trusted, type SafeHtml } from './escape'
import type { FieldPicture } from './field-picture'
import { renderedPlots } from './report-charts'
import { metricsSection } from './report-metrics'
import { REPORT_STYLES } from './report-styles'

export interface ReportPageInput {
  dataset: { accession: string; title: string }
  fileName: string
  /** A finished report (status 'done'). */
  report: QualityReportDto
  field: FieldPicture | null
  generatedAt: Date
}

// Dates in UTC with the zone named, so a printed copy reads the same wherever it was made.
const dateTime = new Intl.DateTimeFormat('en-GB', {
  dateStyle: 'long',
  timeStyle: 'short',
  timeZone: 'UTC',
})
const when = (d: Date) => `${dateTime.format(d)} UTC`

// The report's own policy: nothing may load from anywhere, even if a link slipped in.
const OFFLINE_POLICY = "default-src 'none'; style-src 'unsafe-inline'; img-src data:"

function cardHtml(card: QualityCard): SafeHtml {
  return html`<div class="card" data-card="${card.key}">
    <p class="title">${card.title}</p>
    ${
      card.value
        ? html`<p class="value">${card.value}</p>`
        : html`<p class="reason">
            Not computed${card.metric?.reason ? `: ${card.metric.reason}` : '.'}
          </p>`
    }
    ${
      card.value && card.details.length
        ? html`<ul>
            ${card.details.map((d) => html`<li>${d}</li>`)}
          </ul>`
        : ''
    }
    ${card.verdicts.map(
      (v) =>
        html`<p class="verdict" data-tone="${v.tone}">
          <span class="tone tone-${v.tone}">${VERDICT_TONE_LABELS[v.tone]}</span>
          ${v.text}
        </p>`,
    )}
  </div>`
}

function fieldHtml(field: FieldPicture | null): SafeHtml {
  if (!field)
    return html`<p class="quiet">The picture of the field could not be made for this report.</p>`
  const src = `data:image/png;base64,${Buffer.from(field.png).toString('base64')}`
  const size = `${lengthText(field.widthNm)} × ${lengthText(field.heightNm)}`
  return html`<figure class="field">
    <img
      src="${src}"
      width="${field.widthPx}"
      height="${field.heightPx}"
      alt="The whole field of localizations, rendered as a density image"
    />
    <figcaption>The whole field, ${size}, ${lengthText(field.pixelNm)} per pixel.</figcaption>
  </figure>`
}

function plotsHtml(report: QualityReportDto): SafeHtml {
  const plots = renderedPlots(report)
  if (!plots.length)
    return html`<p class="quiet">This report has no distributions or curves to plot.</p>`
  // The SVG comes from ECharts' renderer; every text in it (axis names, captions) is ours.
  return html`${plots.map(
    (p) =>
      html`<figure class="plot" data-plot="${p.key}">
        <h3>${p.title}</h3>
        ${trusted(p.svg)}
        <figcaption>${p.caption}</figcaption>
      </figure>`,
  )}`
}

/** The standalone quality report: one HTML file that opens offline and prints. */
export function reportPage(input: ReportPageInput): string {
  const { dataset, fileName, report } = input
  const computed = report.computedAt ? when(new Date(report.computedAt)) : '—'
  const page = html`<!doctype html>
    <html lang="en">
      <head>
        <meta charset="utf-8" />
        <meta name="viewport" content="width=device-width, initial-scale=1" />
        <meta http-equiv="Content-Security-Policy" content="${OFFLINE_POLICY}" />
        <title>Quality report · ${dataset.accession} · ${fileName}</title>
        <style>
          ${REPORT_STYLES}
        </style>
      </head>
      <body>
        <main>
          <header>
            <p class="brand">Stipple · quality report</p>
            <h1>${fileName}</h1>
          </header>
          <div class="overview">
            <div>
              <dl class="facts">
                <dt>Dataset</dt>
                <dd data-fact="dataset">${dataset.accession} · ${dataset.title}</dd>
                <dt>File</dt>
                <dd data-fact="file">${fileName}</dd>
                <dt>Report computed</dt>
                <dd data-fact="computed">${computed}</dd>
                <dt>Downloaded</dt>
                <dd data-fact="generated">${when(input.generatedAt)}</dd>
              </dl>
            </div>
            ${fieldHtml(input.field)}
          </div>
          <section id="verdicts" aria-labelledby="verdicts-title">
            <h2 id="verdicts-title">Metrics and verdicts</h2>
            <div class="cards">${qualityCards(report).map(cardHtml)}</div>
          </section>
          <section id="plots" aria-labelledby="plots-title">
            <h2 id="plots-title">Plots</h2>
            ${plotsHtml(report)}
          </section>
          ${metricsSection(report)}
          <footer>
            Made by Stipple from the quality report computed on ${computed}. The verdicts compare
            each measured number with what would be expected of it; they are rules of thumb, not a
            substitute for looking at the data.
          </footer>
        </main>
      </body>
    </html> `
  return page.markup
}
