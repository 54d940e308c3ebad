import { useMemo } from "react";
import { renderMarkdown } from "@calmcrest/contracts";

/**
 * Markdown typed by a person, shown through the one sanitising renderer of @calmcrest/contracts (raw HTML escaped,
 * only http(s)/mailto/relative links, outside links in a new tab with rel="noopener noreferrer", no images). The
 * HTML it returns is safe to insert; the CSP forbids inline script besides.
 */
export function Markdown({ source, lite = false, className = "" }: { source: string; lite?: boolean; className?: string }) {
  const html = useMemo(() => renderMarkdown(source, { lite }), [source, lite]);
  return <div className={`markdown ${className}`} dangerouslySetInnerHTML={{ __html: html }} />;
}
