import { reasonLabel } from "../lib/format";

/**
 * A rejection reason as every screen writes it: plain words, then the code that rejected.csv, the API and the
 * analyzer use ("impossible value non_physical"), so the two can be matched.
 */
export function Reason({ reason }: { reason: string }) {
  return (
    <>
      {reasonLabel(reason)} <code className="text-xs text-ink-soft">{reason}</code>
    </>
  );
}
