export interface TextPart {
  text: string;
  /** Set when the part is an http(s) address. */
  href?: string;
}

const URL_PATTERN = /https?:\/\/[^\s<>"']+/g;

/** Splits plain text into text and http(s) links, so a mail's links can be opened without HTML. */
export function linkify(text: string): TextPart[] {
  const parts: TextPart[] = [];
  let last = 0;
  for (const match of text.matchAll(URL_PATTERN)) {
    const start = match.index;
    // A sentence's closing punctuation is not part of the address.
    const href = match[0].replace(/[.,;:!?)]+$/, '');
    if (start > last) parts.push({ text: text.slice(last, start) });
    parts.push({ text: href, href });
    last = start + href.length;
  }
  if (last < text.length) parts.push({ text: text.slice(last) });
  return parts;
}
