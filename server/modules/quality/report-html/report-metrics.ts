import type { QualityMetric, QualityReportDto } from '@shared/schemas/quality.schema'
import { html, type SafeHtml } from './escape'

/** What each metric key of the report stands for, in the order the report computes them. */
const METRIC_TITLES: Record<string, string> = {
  summary: 'Counts',
  photons: 'Photons per localization',
  background: 'Background',
  sigma: 'PSF width',
  uncertainty: 'Uncertainty column',
  z: 'Depth',
  perFrame: 'Localizations per frame',
  precision: 'Localization precision',
  nena: 'Precision from the data (NeNA)',
  merge: 'Molecules (merged events)',
  frc: 'Resolution (FRC)',
  frcDriftCorrected: 'Resolution after drift correction (FRC)',
  drift: 'Drift',
  density: 'Labelling density (localizations)',
  densityMerged: 'Labelling density (merged events)',
  diffraction: 'Diffraction limit',
}

type Scalar = number | string | boolean
interface Field {
  name: string
  value: Scalar
}

const isScalar = (v: unknown): v is Scalar =>
  (typeof v === 'number' && Number.isFinite(v)) || typeof v === 'string' || typeof v === 'boolean'
const isRecord = (v: unknown): v is Record<string, unknown> =>
  typeof v === 'object' && v !== null && !Array.isArray(v)

/** `resolutionUncorrectedNm` → `resolution uncorrected (nm)`: the JSON field, readable. */
export function fieldLabel(path: string): string {
  return path
    .split('.')
    .map((key) =>
      key
        .replace(/PerUm2$/, ' per µm²')
        .replace(/PerNm$/, ' per nm')
        .replace(/Um2$/, ' (µm²)')
        .replace(/Nm$/, ' (nm)')
        .replace(/([a-z])([A-Z])/g, '$1 $2')
        .toLowerCase(),
    )
    .join(' · ')
}

/**
 * The numbers and words of a metric's value: its scalar fields, and those one level down
 * (curves, histograms and trajectories are drawn as plots, not listed).
 */
export function valueFields(value: unknown): Field[] {
  if (isScalar(value)) return [{ name: 'value', value }]
  if (!isRecord(value)) return []
  const fields: Field[] = []
  for (const [key, v] of Object.entries(value)) {
    if (isScalar(v)) fields.push({ name: key, value: v })
    else if (isRecord(v))
      for (const [inner, w] of Object.entries(v))
        if (isScalar(w)) fields.push({ name: `${key}.${inner}`, value: w })
  }
  return fields
}

const wholeFmt = new Intl.NumberFormat('en', { maximumFractionDigits: 2 })
const smallFmt = new Intl.NumberFormat('en', { maximumSignificantDigits: 3 })
const scalarText = (v: Scalar) =>
  typeof v === 'number' ? (Math.abs(v) >= 1 ? wholeFmt : smallFmt).format(v) : String(v)
const parameterText = (v: unknown) => (isScalar(v) ? scalarText(v) : JSON.stringify(v))

function fieldRows(fields: Field[]): SafeHtml {
  return html`${fields.map(
    (f) =>
      html`<tr>
        <th scope="row">${fieldLabel(f.name)}</th>
        <td data-field="${f.name}" data-value="${String(f.value)}">${scalarText(f.value)}</td>
      </tr>`,
  )}`
}

function metricSection(key: string, metric: QualityMetric): SafeHtml {
  const fields = metric.value === null ? [] : valueFields(metric.value)
  const parameters = Object.entries(metric.parameters)
  return html`<article class="metric" data-metric="${key}">
    <h3>${METRIC_TITLES[key] ?? key}</h3>
    <p class="method"><span class="label">Method:</span> ${metric.method}</p>
    ${
      metric.value === null
        ? html`<p class="reason" data-reason>
            <strong>Not computed.</strong> ${metric.reason ?? 'No reason was recorded.'}
          </p>`
        : fields.length
          ? html`<table class="values">
              <caption>
                Values
              </caption>
              ${fieldRows(fields)}
            </table>`
          : html`<p class="quiet">Its values are drawn in the plots above.</p>`
    }
    ${
      parameters.length
        ? html`<table class="parameters">
            <caption>
              Parameters
            </caption>
            ${parameters.map(
              ([name, v]) =>
                html`<tr>
                  <th scope="row">${fieldLabel(name)}</th>
                  <td data-parameter="${name}">${parameterText(v)}</td>
                </tr>`,
            )}
          </table>`
        : ''
    }
    ${metric.value !== null && metric.reason ? html`<p class="reason">${metric.reason}</p>` : ''}
  </article>`
}

/** Every metric of the report with its values, method, parameters and reason when not computed. */
export function metricsSection(report: QualityReportDto): SafeHtml {
  const known = Object.keys(METRIC_TITLES).filter((k) => report.metrics[k])
  const others = Object.keys(report.metrics).filter((k) => !(k in METRIC_TITLES))
  return html`<section id="metrics" aria-labelledby="metrics-title">
    <h2 id="metrics-title">Every metric, its method and parameters</h2>
    <div class="metrics">
      ${[...known, ...others].map((key) => metricSection(key, report.metrics[key]!))}
    </div>
  </section>`
}
