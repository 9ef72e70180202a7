import escapeHtml from 'escape-html'

/**
 * Markup that may go into the page as it is: built by `html` (which escaped everything it was
 * given) or marked `trusted` (output of our own renderers). Everything else is text.
 */
export class SafeHtml {
  constructor(readonly markup: string) {}
  toString(): string {
    return this.markup
  }
}

export type HtmlPart = SafeHtml | string | number | null | undefined | false | readonly HtmlPart[]

function partToHtml(part: HtmlPart): string {
  if (part === null || part === undefined || part === false) return ''
  if (part instanceof SafeHtml) return part.markup
  if (Array.isArray(part)) return part.map(partToHtml).join('')
  // escape-html (Express's own) escapes & < > " ': safe in text and in quoted attributes.
  return escapeHtml(String(part))
}

/**
 * The page's only way to write markup: a tagged template whose interpolations are escaped unless
 * they are SafeHtml, so a title or file name can never become markup. Arrays are joined.
 */
export function html(strings: TemplateStringsArray, ...parts: HtmlPart[]): SafeHtml {
  let markup = strings[0] ?? ''
  parts.forEach((part, i) => (markup += partToHtml(part) + (strings[i + 1] ?? '')))
  return new SafeHtml(markup)
}

/** Markup made by a renderer we trust (ECharts' SVG, our style sheet): placed as it is. */
export const trusted = (markup: string) => new SafeHtml(markup)
