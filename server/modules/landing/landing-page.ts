import { orcidUrl } from '@shared/domain/identifiers'
import { landingPath } from '@shared/domain/landing'
import { html, trusted, type SafeHtml } from '../quality/report-html/escape'
import type { LandingView } from './landing.service'

const bytes = new Intl.NumberFormat('en-GB')
const day = (d: Date | null) => (d ? d.toISOString().slice(0, 10) : '—')
const nm = (v: number | null) => (v === null ? '—' : `${v.toFixed(1)} nm`)

/**
 * JSON inside <script type="application/ld+json">: `<` is written as \u003c so that no text from
 * a title or description can close the element (the escaping schema.org's own examples rely on).
 */
const jsonForScript = (value: unknown) =>
  trusted(
    JSON.stringify(value)
      .replace(/</g, '\\u003c')
      .replace(/\u2028|\u2029/g, ' '),
  )

interface Shell {
  title: string
  description: string
  canonical?: string
  head?: SafeHtml
  body: SafeHtml
}

/** The public pages' frame: Stipple's dark-slate bar, Lato, links into the app. No script runs. */
function shell({ title, description, canonical, head, body }: Shell): string {
  return `<!doctype html>${html`<html lang="en">
    <head>
      <meta charset="utf-8" />
      <meta name="viewport" content="width=device-width, initial-scale=1" />
      <title>${title} · Stipple</title>
      <meta name="description" content="${description}" />
      ${canonical ? html`<link rel="canonical" href="${canonical}" />` : ''}
      <link rel="stylesheet" href="/server-assets/landing.css" />
      ${head ?? ''}
    </head>
    <body>
      <header class="bar">
        <a class="brand" href="/"><span class="dot"></span>Stipple</a>
        <nav>
          <a href="/search">Search datasets</a><a href="/auth/login?returnTo=%2F">Sign in</a>
        </nav>
      </header>
      <main class="page">${body}</main>
      <footer class="foot">
        Stipple: a hub for single-molecule localization microscopy data. Licence summaries are no
        legal advice; the licence text decides.
      </footer>
    </body>
  </html>`}`
}

/** The 404 page: the same words whether the accession is unknown, a draft or not yet approved. */
export function notFoundPage(): string {
  return shell({
    title: 'No public dataset here',
    description: 'No public dataset has this address.',
    head: html`<meta name="robots" content="noindex" />`,
    body: html`<section class="card">
      <h1>No public dataset here</h1>
      <p>
        There is no public dataset at this address. Check the accession, or
        <a href="/search">search the public datasets</a>.
      </p>
    </section>`,
  })
}

function authorsOf(view: LandingView): SafeHtml {
  const authors = (view.subject.metadata.study?.authors ?? []).filter((a) => a.name)
  if (!authors.length) return html`<p class="authors">${view.subject.projectName}</p>`
  return html`<p class="authors">
    ${authors.map(
      (a, i) =>
        html`${i ? ', ' : ''}<span class="author"
            >${a.name}${
              a.orcid ? html` <a class="orcid" href="${orcidUrl(a.orcid)}">ORCID</a>` : ''
            }${a.affiliation ? html` <span class="muted">(${a.affiliation})</span>` : ''}</span
          >`,
    )}
  </p>`
}

function facts(view: LandingView): SafeHtml {
  const m = view.subject.metadata
  const labels = (m.labelling ?? [])
    .map((l) => [l.target, l.label && `(${l.label})`].filter(Boolean).join(' '))
    .filter(Boolean)
  const rows: [string, string | undefined][] = [
    ['Technique', m.acquisition?.technique],
    ['Organism', m.biosample?.organism?.name],
    ['Structure imaged', m.biosample?.structure],
    ['Labels', labels.join('; ') || undefined],
    ['Microscope', m.instrument?.microscopeModel],
    ['Keywords', (m.study?.keywords ?? []).join(', ') || undefined],
  ]
  const shown = rows.filter(([, v]) => v)
  if (!shown.length) return html``
  return html`<dl class="facts">
    ${shown.map(
      ([k, v]) =>
        html`<dt>${k}</dt>
          <dd>${v}</dd>`,
    )}
  </dl>`
}

function licenceSection(view: LandingView): SafeHtml {
  const l = view.licence
  return html`<section class="card" id="licence">
    <h2>Licence</h2>
    <p><a href="${l.url}">${l.name}</a> <code>${l.id}</code></p>
    <div class="columns">
      <div>
        <h3>You may</h3>
        <ul>
          ${l.allows.map((a) => html`<li>${a}</li>`)}
        </ul>
      </div>
      <div>
        <h3>You must</h3>
        <ul>
          ${l.requires.map((r) => html`<li>${r}</li>`)}
        </ul>
      </div>
    </div>
  </section>`
}

function versionsSection(view: LandingView): SafeHtml {
  const pathOf = (n: number) => landingPath(view.subject.accession, n)
  return html`<section class="card" id="versions">
    <h2>Versions</h2>
    <table>
      <thead>
        <tr>
          <th>Version</th>
          <th>Approved</th>
          <th>DOI</th>
          <th>Page</th>
        </tr>
      </thead>
      <tbody>
        ${view.versions.map(
          (v) =>
            html`<tr${v.number === view.version.number ? html` class="current"` : ''}><td>v${v.number}</td><td>${day(v.approvedAt)}</td><td>${v.doi ? html`<a href="https://doi.org/${v.doi}">${v.doi}</a>` : '—'}</td><td><a href="${pathOf(v.number)}">${pathOf(v.number)}</a></td></tr>`,
        )}
      </tbody>
    </table>
  </section>`
}

function filesSection(view: LandingView): SafeHtml {
  if (view.kind === 'embargoed' && !view.forReviewer) {
    return html`<section class="card notice" id="files">
      <h2>Files</h2>
      <p>
        This dataset is under embargo until <strong>${day(view.subject.embargoUntil)}</strong>. Its
        files, previews and quality reports open to everyone on that day (00:00 UTC); until then
        only its description is public, as agreed with the depositors.
      </p>
    </section>`
  }
  const files = view.subject.files
  return html`<section class="card" id="files">
    <h2>Files</h2>
    ${
      view.forReviewer
        ? html`<p class="muted">
            Open to you through a reviewer link for version ${view.version.number}: these are its
            files exactly as they were approved.
          </p>`
        : ''
    }
    ${
      files.length
        ? html`<table>
            <thead>
              <tr>
                <th>File</th>
                <th class="num">Size (bytes)</th>
                <th>SHA-256</th>
              </tr>
            </thead>
            <tbody>
              ${files.map(
                (f) =>
                  html`<tr>
                    <td>${f.url ? html`<a href="${f.url}" download>${f.name}</a>` : f.name}</td>
                    <td class="num">${bytes.format(f.size)}</td>
                    <td><code class="hash">${f.sha256 ?? '—'}</code></td>
                  </tr>`,
              )}
            </tbody>
          </table>`
        : html`<p class="muted">No files.</p>`
    }
  </section>`
}

function qualitySection(view: LandingView): SafeHtml {
  if (!view.quality.length) return html``
  return html`<section class="card" id="quality">
    <h2>Quality at a glance</h2>
    <table>
      <thead>
        <tr>
          <th>Localization table</th>
          <th class="num">Localizations</th>
          <th class="num">Precision (median)</th>
          <th class="num">FRC resolution</th>
          <th class="num">Drift</th>
        </tr>
      </thead>
      <tbody>
        ${view.quality.map(
          (q) =>
            html`<tr>
              <td>${q.fileName}</td>
              <td class="num">${q.localizations === null ? '—' : bytes.format(q.localizations)}</td>
              <td class="num">${nm(q.precisionMedianNm)}</td>
              <td class="num">${nm(q.frcResolutionNm)}</td>
              <td class="num">${nm(q.driftNm)}</td>
            </tr>`,
        )}
      </tbody>
    </table>
  </section>`
}

function citeSection(view: LandingView): SafeHtml {
  const c = view.citations
  const base = landingPath(view.subject.accession, view.version.number)
  return html`<section class="card" id="cite">
    <h2>Cite this dataset</h2>
    <p class="citation">${c.text}</p>
    <details>
      <summary>BibTeX</summary>
      <pre>${c.bibtex}</pre>
      <a href="${base}/cite.bib">Download .bib</a>
    </details>
    <details>
      <summary>RIS</summary>
      <pre>${c.ris}</pre>
      <a href="${base}/cite.ris">Download .ris</a>
    </details>
    <h3>Data availability statement</h3>
    <p class="statement">${view.availability}</p>
  </section>`
}

/** The public landing page of one dataset version. */
export function landingPage(view: LandingView): string {
  const s = view.subject
  if (view.kind === 'withdrawn') {
    return shell({
      title: `${s.accession} (withdrawn)`,
      description: `${s.accession} was withdrawn.`,
      canonical: view.pageUrl,
      head: html`<meta name="robots" content="noindex" />`,
      body: html`<section class="card tombstone">
        <p class="eyebrow">${s.accession} · withdrawn</p>
        <h1>${s.title}</h1>
        <p>
          This dataset was withdrawn${view.withdrawal ? html` on ${view.withdrawal.at}` : ''}. Its
          files are no longer available.
        </p>
        <h2>Reason</h2>
        <p class="reason">${view.withdrawal?.reason ?? 'No reason was recorded.'}</p>
        <p class="muted">
          Citations of ${s.accession} keep pointing here so that readers learn what happened.
        </p>
      </section>`,
    })
  }
  const summary = (s.description || s.title).slice(0, 300)
  return shell({
    title: `${s.title} (${s.accession})`,
    description: summary,
    canonical: view.pageUrl,
    head: html`<script type="application/ld+json">
      ${jsonForScript(view.jsonLd)}
    </script>`,
    body: html`<section class="card hero">
        <p class="eyebrow">
          ${s.accession} · version ${view.version.number} ·
          ${
            view.kind === 'open'
              ? 'public'
              : html`<span class="badge">under embargo until ${day(s.embargoUntil)}</span>`
          }
        </p>
        <h1>${s.title}</h1>
        ${authorsOf(view)}
        <p class="description">${s.description}</p>
        ${facts(view)}
        <p class="links">
          ${view.appUrl ? html`<a class="button" href="${view.appUrl}">Open in Stipple</a> ` : ''}<a
            href="#cite"
            >Cite</a
          >
          <a href="#files">Files</a>
        </p>
      </section>
      ${citeSection(view)} ${licenceSection(view)} ${filesSection(view)} ${qualitySection(view)}
      ${versionsSection(view)}`,
  })
}
