import { describe, expect, it } from "vitest";
import { isSafeLinkTarget, renderMarkdown } from "./markdown";

const HOSTILE_SECTION = [
  "# Results",
  "<script>window.pwned = 1</script>",
  "<img src=x onerror=\"window.pwned = 2\">",
  "<a href=\"javascript:alert(1)\">raw link</a>",
  "[click](javascript:alert(1)) [tab](java\tscript:alert(1)) [upper](JAVASCRIPT:alert(1)) [data](data:text/html;base64,PHNjcmlwdD5hbGVydCgxKTwvc2NyaXB0Pg==)",
  "[vb](vbscript:msgbox) [encoded](javascript&#58;alert(1)) [spaced]( javascript:alert(1))",
  "![pic](https://tracker.example.org/pixel.png)",
  "<iframe src=\"https://evil.example.org\"></iframe>",
  "<svg onload=alert(1)>",
  "[ok](https://example.org/page) and <https://example.org/auto>",
].join("\n\n");

describe("the Markdown renderer", () => {
  it("renders ordinary Markdown", () => {
    expect(renderMarkdown("**Dry** nights")).toBe("<p><strong>Dry</strong> nights</p>\n");
    expect(renderMarkdown("## Method\n\n- one\n- two")).toContain("<h2>Method</h2>");
  });

  it("turns a hostile section into inert text: no script element, no event attribute, no script link, no raw HTML", () => {
    const html = renderMarkdown(HOSTILE_SECTION);
    expect(html).not.toMatch(/<script/i);
    expect(html).not.toMatch(/<img/i);
    expect(html).not.toMatch(/<iframe/i);
    expect(html).not.toMatch(/<svg/i);
    // Attributes can only appear inside a tag; escaped text (&lt;img onerror=…) is harmless.
    expect(html).not.toMatch(/<[^>]*\son\w+\s*=/i);
    expect(html).not.toMatch(/href="\s*(javascript|vbscript|data)/i);
    const hrefs = [...html.matchAll(/href="([^"]*)"/g)].map((match) => match[1]);
    // Only the safe https addresses became links (the image and the iframe's address as plain links at most).
    expect(hrefs).toEqual(["https://tracker.example.org/pixel.png", "https://evil.example.org", "https://example.org/page", "https://example.org/auto"]);
    expect(html).toContain('<a href="https://example.org/page" target="_blank" rel="noopener noreferrer">ok</a>');
    // The raw tags are still there for the reader to see, escaped.
    expect(html).toContain("&lt;script&gt;");
  });

  it("opens outside links in a new tab without a way back to the opener", () => {
    expect(renderMarkdown("[x](https://example.org)")).toBe('<p><a href="https://example.org" target="_blank" rel="noopener noreferrer">x</a></p>\n');
    // A path on this server stays in the tab.
    expect(renderMarkdown("[v1](/reports/1?version=1)")).toBe('<p><a href="/reports/1?version=1">v1</a></p>\n');
  });

  it("keeps comments light: no headings or tables, line breaks kept", () => {
    const html = renderMarkdown("# Not a heading\nsecond line", { lite: true });
    expect(html).not.toContain("<h1>");
    expect(html).toContain("<br>");
  });

  it("judges link targets by their scheme after removing blanks and control characters", () => {
    for (const bad of ["javascript:alert(1)", " JavaScript:alert(1)", "java\nscript:x", "data:text/html,x", "file:///etc/passwd", "//evil.example.org", "javascript%3Aalert(1)", "vbscript:x", ""]) {
      expect(isSafeLinkTarget(bad), bad).toBe(false);
    }
    for (const good of ["https://example.org", "http://example.org/a:b", "mailto:lead@calmcrest.test", "/reports/2", "#section-3", "?version=1", "notes/page"]) {
      expect(isSafeLinkTarget(good), good).toBe(true);
    }
  });
});
