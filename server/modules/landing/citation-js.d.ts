// citation-js ships no typings; these are the few calls Stipple makes (see citations.ts).
declare module '@citation-js/core' {
  export class Cite {
    constructor(data: unknown)
    format(format: string, options?: Record<string, unknown>): string
  }
}
declare module '@citation-js/plugin-csl'
declare module '@citation-js/plugin-bibtex'
declare module '@citation-js/plugin-ris'
