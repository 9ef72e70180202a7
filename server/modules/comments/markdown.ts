import MarkdownIt from 'markdown-it'
import sanitizeHtml from 'sanitize-html'

/**
 * Comments are Markdown. markdown-it runs with raw HTML off (typed tags come out as text), and
 * its output still goes through sanitize-html with a short allow-list, so no script, handler,
 * style or foreign frame reaches the page whatever the renderer lets through.
 */
const markdown = new MarkdownIt({ html: false, linkify: true, breaks: true })
// An @-mention is an e-mail address; it stays text rather than becoming a mailto link.
markdown.linkify.set({ fuzzyEmail: false })

const ALLOWED: sanitizeHtml.IOptions = {
  allowedTags: [
    'p',
    'br',
    'strong',
    'em',
    's',
    'code',
    'pre',
    'blockquote',
    'ul',
    'ol',
    'li',
    'a',
    'h1',
    'h2',
    'h3',
    'h4',
    'hr',
    'table',
    'thead',
    'tbody',
    'tr',
    'th',
    'td',
  ],
  allowedAttributes: { a: ['href', 'title', 'rel', 'target'], ol: ['start'] },
  allowedSchemes: ['http', 'https', 'mailto'],
  allowProtocolRelative: false,
  transformTags: {
    a: sanitizeHtml.simpleTransform('a', { rel: 'noopener noreferrer nofollow', target: '_blank' }),
  },
}

export function renderCommentMarkdown(source: string): string {
  return sanitizeHtml(markdown.render(source), ALLOWED)
}

/** `@address@lab.org` in the text: the addresses, lower case, each once. */
export function mentionedAddresses(source: string): string[] {
  const found = source.matchAll(/(?:^|[^\w@])@([\w.+-]+@[\w-]+(?:\.[\w-]+)+)/g)
  return [...new Set([...found].map((m) => m[1]!.toLowerCase().replace(/\.+$/, '')))]
}
