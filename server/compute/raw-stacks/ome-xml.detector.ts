/** The prolog may hold the XML declaration, processing instructions, comments and a DOCTYPE. */
const OME_ROOT =
  /^\uFEFF?\s*(?:<\?[\s\S]*?\?>\s*|<!--[\s\S]*?-->\s*|<!DOCTYPE(?:[^[>]|\[[\s\S]*?\])*>\s*)*<(?:[A-Za-z_][\w.-]*:)?OME[\s/>]/

/** Enough of a document to reach its root element behind any reasonable prolog. */
const PROLOG_LIMIT = 64 * 1024

/** True when the text is an XML document whose root element is OME (any namespace prefix). */
export function isOmeXml(text: string): boolean {
  return OME_ROOT.test(text.slice(0, PROLOG_LIMIT))
}
