import { renderMarkdown, type MailLink } from "@calmcrest/contracts";

// Builds both parts of a Calmcrest e-mail from the same pieces, so the text and HTML parts say the same thing.
// People's words (a comment, a section) go through the one sanitising Markdown renderer; everything else is
// escaped. No inline style and no script: the HTML part is plain semantic markup.

export interface MailPieces {
  /** First line of the message, e.g. "Version 2 of “Ridge comparison” is published." */
  heading: string;
  /** Plain sentences after the heading. */
  paragraphs?: string[];
  /** Someone's Markdown to quote (a comment): rendered with the comment renderer in HTML, kept as typed in text. */
  quote?: { author: string; markdown: string };
  links: MailLink[];
  /** Why the recipient gets this message and how to stop it, when they can. */
  footer: string;
}

export function escapeHtml(text: string): string {
  return text.replace(/&/g, "&amp;").replace(/</g, "&lt;").replace(/>/g, "&gt;").replace(/"/g, "&quot;").replace(/'/g, "&#39;");
}

/** The text and HTML parts of a message. */
export function composeMail(pieces: MailPieces): { text: string; html: string; links: MailLink[] } {
  const paragraphs = pieces.paragraphs ?? [];
  const textLines = [pieces.heading, "", ...paragraphs.flatMap((paragraph) => [paragraph, ""])];
  if (pieces.quote) {
    textLines.push(`${pieces.quote.author} wrote:`, ...pieces.quote.markdown.trim().split(/\r?\n/).map((line) => `> ${line}`), "");
  }
  for (const link of pieces.links) textLines.push(`${link.label}: ${link.url}`);
  textLines.push("", "-- ", pieces.footer);

  const html = [
    "<!doctype html>",
    '<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width"><title>' + escapeHtml(pieces.heading) + "</title></head><body>",
    `<h1>${escapeHtml(pieces.heading)}</h1>`,
    ...paragraphs.map((paragraph) => `<p>${escapeHtml(paragraph)}</p>`),
    ...(pieces.quote ? [`<p>${escapeHtml(pieces.quote.author)} wrote:</p>`, `<blockquote>${renderMarkdown(pieces.quote.markdown, { lite: true })}</blockquote>`] : []),
    pieces.links.length > 0 ? `<ul>${pieces.links.map((link) => `<li><a href="${escapeHtml(link.url)}">${escapeHtml(link.label)}</a></li>`).join("")}</ul>` : "",
    `<hr><p><small>${escapeHtml(pieces.footer)}</small></p>`,
    "</body></html>",
  ].join("\n");
  return { text: `${textLines.join("\n").trimEnd()}\n`, html, links: pieces.links };
}
