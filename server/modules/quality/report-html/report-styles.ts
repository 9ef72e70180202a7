import { trusted } from './escape'

/**
 * The report's only style sheet, inline: system fonts (no web font to fetch), the app's slate and
 * amber, and print rules that keep a card, a plot or a metric on one page.
 */
export const REPORT_STYLES = trusted(`
:root { color-scheme: light; --ink: #1d2731; --quiet: #4b5563; --rule: #d9dde2; --accent: #c0661a;
  --good: #2e7d32; --fair: #a15c00; --poor: #c62828; --note: #1f6fb2; }
* { box-sizing: border-box; }
html { font: 15px/1.5 system-ui, -apple-system, "Segoe UI", Roboto, sans-serif; color: var(--ink); background: #f4f5f7; }
body { margin: 0; }
main { max-width: 800px; margin: 0 auto; padding: 32px 40px 48px; background: #fff; }
h1 { font-size: 1.75rem; line-height: 1.25; margin: 4px 0 16px; overflow-wrap: anywhere; }
h2 { font-size: 1.25rem; margin: 36px 0 12px; padding-bottom: 4px; border-bottom: 2px solid var(--accent); }
h3 { font-size: 1rem; margin: 0 0 6px; }
p { margin: 0 0 8px; }
.brand { font-weight: 700; letter-spacing: .04em; text-transform: uppercase; font-size: .8rem; color: var(--accent); margin: 0; }
.facts { display: grid; grid-template-columns: max-content 1fr; gap: 2px 16px; margin: 0; }
.facts dt { color: var(--quiet); }
.facts dd { margin: 0; overflow-wrap: anywhere; }
.overview { display: grid; grid-template-columns: minmax(0, 1fr) 300px; gap: 24px; align-items: start; }
.field { margin: 0; }
.field img { display: block; max-width: 100%; height: auto; background: #000; border-radius: 4px; }
.field figcaption, figure figcaption, .quiet { color: var(--quiet); font-size: .875rem; }
.cards { display: grid; grid-template-columns: repeat(2, minmax(0, 1fr)); gap: 12px; }
.card { border: 1px solid var(--rule); border-radius: 8px; padding: 12px 14px; break-inside: avoid; }
.card .title { color: var(--quiet); font-size: .875rem; margin: 0; }
.card .value { font-size: 1.35rem; font-weight: 700; margin: 0 0 4px; }
.card ul { margin: 0 0 6px; padding-left: 18px; color: var(--quiet); font-size: .875rem; }
.verdict { font-size: .9rem; }
.tone { display: inline-block; margin-right: 4px; font-size: .7rem; font-weight: 700; text-transform: uppercase; letter-spacing: .03em;
  padding: 1px 6px; border-radius: 4px; border: 1px solid currentColor; }
.tone-good { color: var(--good); } .tone-fair { color: var(--fair); } .tone-poor { color: var(--poor); } .tone-note { color: var(--note); }
.plot { margin: 0 0 20px; break-inside: avoid; }
.plot svg { display: block; width: 100%; height: auto; border: 1px solid var(--rule); border-radius: 4px; }
.metrics { display: grid; gap: 12px; }
.metric { border-top: 1px solid var(--rule); padding-top: 10px; break-inside: avoid;
  display: grid; grid-template-columns: repeat(2, minmax(0, 1fr)); gap: 0 24px; align-items: start; }
.metric > h3, .metric > p { grid-column: 1 / -1; }
.method { font-size: .9rem; }
.method .label { color: var(--quiet); }
table { border-collapse: collapse; margin: 0 0 8px; font-size: .875rem; }
caption { text-align: left; color: var(--quiet); font-size: .8rem; }
th, td { text-align: left; padding: 1px 16px 1px 0; vertical-align: top; }
th { font-weight: 400; color: var(--quiet); }
td { font-variant-numeric: tabular-nums; overflow-wrap: anywhere; }
.reason { color: var(--quiet); font-style: italic; }
footer { margin-top: 40px; color: var(--quiet); font-size: .8rem; }
@media (max-width: 640px) { main { padding: 20px; } .cards, .overview, .metric { grid-template-columns: 1fr; } }
@media print {
  @page { margin: 16mm; }
  html { background: #fff; font-size: 11pt; }
  main { max-width: none; padding: 0; }
  h2 { break-after: avoid; }
}
`)
