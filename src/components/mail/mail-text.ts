/** A piece of a plain-text mail body: text, or a link that can be made clickable. */
export type MailPart = { kind: 'text'; text: string } | { kind: 'link'; href: string; path: string | null }

const URL_PATTERN = /https?:\/\/[^\s<>"')\]]+/g

/**
 * Split a plain-text body into text and links, without ever rendering the mail as HTML.
 * `path` is set for links into this same Overtone (same origin), so they open inside the app.
 */
export function splitMailText(text: string, origin: string): MailPart[] {
  const parts: MailPart[] = []
  let last = 0
  for (const match of text.matchAll(URL_PATTERN)) {
    const start = match.index ?? 0
    if (start > last) parts.push({ kind: 'text', text: text.slice(last, start) })
    const href = match[0].replace(/[.,;:!?]+$/, '')
    parts.push({ kind: 'link', href, path: sameOriginPath(href, origin) })
    last = start + href.length
  }
  if (last < text.length) parts.push({ kind: 'text', text: text.slice(last) })
  return parts
}

function sameOriginPath(href: string, origin: string): string | null {
  try {
    const url = new URL(href)
    return url.origin === origin ? url.pathname + url.search + url.hash : null
  } catch {
    return null
  }
}
