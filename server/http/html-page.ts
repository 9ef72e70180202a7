/** Escapes text for HTML element content and attribute values. */
export function escapeHtml(value: string): string {
  return value.replace(
    /[&<>"']/g,
    (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!,
  )
}

export interface PageOptions {
  title: string
  /** Trusted HTML: build it with escapeHtml() around every value that came from outside. */
  body: string
  scripts?: string[]
}

/**
 * The few pages the server renders itself (the stand-in identity provider, sign-in errors) in
 * Stipple's look. No inline script or style: the Content-Security-Policy forbids them.
 */
export function renderPage({ title, body, scripts = [] }: PageOptions): string {
  return `<!doctype html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>${escapeHtml(title)} · Stipple</title>
<link rel="stylesheet" href="/server-assets/page.css">
${scripts.map((s) => `<script src="${escapeHtml(s)}" defer></script>`).join('\n')}
</head>
<body>
<main class="card">
<div class="brand"><span class="dot"></span>Stipple</div>
${body}
</main>
</body>
</html>`
}
