import type { CampaignMonitor } from "@calmcrest/contracts";
import { formatNumber } from "../lib/format";

/** The monitor of a campaign as a short definition list: what makes its numbers comparable with others. */
export function MonitorSettings({ monitor }: { monitor: CampaignMonitor }) {
  const rows: [string, string][] = [
    ["Subaperture diameter", `${formatNumber(monitor.apertureMm)} mm`],
    ["Baseline", `${formatNumber(monitor.baselineMm)} mm`],
    ["Measured at", `${formatNumber(monitor.wavelengthNm)} nm`],
    ["Height above ground", monitor.heightAboveGroundM === null ? "not recorded" : `${formatNumber(monitor.heightAboveGroundM, 1)} m`],
    ["Pixel scale", monitor.pixelScaleArcsec === null ? "–" : `${formatNumber(monitor.pixelScaleArcsec, 3)} ″/px`],
    ["Exposure", monitor.exposureMs === null ? "–" : `${formatNumber(monitor.exposureMs, 1)} ms`],
    ["Response coefficients", monitor.responseName],
  ];
  return (
    <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-sm">
      {rows.map(([label, value]) => (
        <div key={label} className="contents">
          <dt className="text-ink-soft">{label}</dt>
          <dd className="tabular-nums">{value}</dd>
        </div>
      ))}
    </dl>
  );
}
