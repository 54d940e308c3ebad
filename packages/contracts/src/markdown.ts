import markdownIt, { type MarkdownIt } from "markdown-it";

// The one Markdown renderer of Calmcrest: report sections and comments in the web app, and the HTML part of
// e-mails on the server. What a person types can never become markup that runs:
// - raw HTML is off (`html: false`): `<script>`, `<img onerror=…>`, `<iframe>` are shown as text, escaped;
// - links must be http(s), mailto or a path on this server; anything else (`javascript:`, `data:`, `vbscript:`,
//   `file:`, an obfuscated scheme) is left as plain text;
// - images are off (an outside image would leak who reads a report, and the CSP blocks other hosts anyway);
// - links that leave Calmcrest open in a new tab with rel="noopener noreferrer", so the opened page cannot reach
//   back into Calmcrest or learn which report linked to it.

/** Schemes a link may have. Everything else, including schemes written with odd case or spacing, is refused. */
const ALLOWED_SCHEMES = new Set(["http:", "https:", "mailto:"]);

/**
 * Whether a link target may become a link: an absolute http(s)/mailto address or a path on this server
 * (`/reports/3`, `#section-2`, `?v=1`). Control characters and blanks are removed before the scheme is read, as
 * browsers do (`java\tscript:` is `javascript:` to a browser).
 */
export function isSafeLinkTarget(url: string): boolean {
  // Browsers ignore ASCII control characters and whitespace inside a scheme; so do we when judging one.
  // eslint-disable-next-line no-control-regex
  const squeezed = url.replace(/[\u0000-\u0020\u007f-\u009f]/g, "").toLowerCase();
  if (squeezed === "") return false;
  // Percent-encoded or entity-encoded characters before the first colon hide a scheme; refuse them.
  const schemeMatch = /^([a-z][a-z0-9+.-]*):/.exec(squeezed);
  if (schemeMatch) return ALLOWED_SCHEMES.has(`${schemeMatch[1]}:`);
  if (squeezed.startsWith("//") || squeezed.startsWith("\\")) return false; // another host without a scheme
  const beforeSlash = squeezed.split(/[/?#]/, 1)[0] ?? "";
  // "javascript%3aalert(1)" has no literal colon but a browser would not decode it into a scheme either; a colon
  // or an encoded one before the first slash is refused all the same, to stay simple.
  return !beforeSlash.includes(":") && !/%3a|&#|&colon/i.test(beforeSlash);
}

export interface MarkdownOptions {
  /**
   * Comments use a lighter set: paragraphs, emphasis, code, lists, quotes and links; no headings, tables or rules
   * (a comment should not look like a section of the report).
   */
  lite?: boolean;
}

function createRenderer(lite: boolean): MarkdownIt {
  const md = markdownIt({ html: false, linkify: true, typographer: false, breaks: lite });
  md.disable(["image"]);
  if (lite) md.disable(["heading", "lheading", "table", "hr"]);
  md.validateLink = isSafeLinkTarget;
  const defaultLinkOpen = md.renderer.rules.link_open ?? ((tokens, idx, options, _env, self) => self.renderToken(tokens, idx, options));
  md.renderer.rules.link_open = (tokens, idx, options, env, self) => {
    const token = tokens[idx];
    const href = String(token?.attrGet("href") ?? "");
    if (token && /^(https?:|mailto:)/i.test(href)) {
      token.attrSet("target", "_blank");
      token.attrSet("rel", "noopener noreferrer");
    }
    return defaultLinkOpen(tokens, idx, options, env, self);
  };
  return md;
}

const fullRenderer = createRenderer(false);
const liteRenderer = createRenderer(true);

/**
 * Markdown to HTML that is safe to insert into a page or an e-mail: raw HTML escaped, only safe links, no
 * images. Example: `renderMarkdown("**Dry** nights")` → `"<p><strong>Dry</strong> nights</p>\n"`.
 */
export function renderMarkdown(markdown: string, options: MarkdownOptions = {}): string {
  return (options.lite ? liteRenderer : fullRenderer).render(markdown);
}

/** Plain text of a Markdown text (for e-mail text parts and previews): the source itself, trimmed. */
export function markdownExcerpt(markdown: string, maxChars = 400): string {
  const text = markdown.trim();
  return text.length <= maxChars ? text : `${text.slice(0, maxChars - 1).trimEnd()}…`;
}
