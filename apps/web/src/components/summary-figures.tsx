import type { SummaryResponse } from "@calmcrest/contracts";
import { formatArcsec, formatNumber, formatPercent } from "../lib/format";
import { SummaryWarnings } from "./summary-details";
import { Reason } from "./reason";

function Figure({ label, value, detail }: { label: string; value: string; detail?: string }) {
  return (
    <div className="rounded-lg border border-line bg-panel px-4 py-3">
      <dt className="text-sm text-ink-soft">{label}</dt>
      <dd className="mt-1 text-2xl font-semibold tracking-tight tabular-nums">{value}</dd>
      {detail ? <dd className="mt-0.5 text-sm text-ink-soft">{detail}</dd> : null}
    </div>
  );
}

/** The headline figures of a summary, and what was counted out and why. */
export function SummaryFigures({ summary }: { summary: SummaryResponse }) {
  const { samples } = summary;
  if (samples.read === 0 && summary.empty) return null;
  const reasons = Object.entries(samples.rejectedByReason).filter(([, count]) => (count ?? 0) > 0);
  const wavelengths = [...new Set(summary.campaigns.map((campaign) => campaign.wavelengthNm))];
  return (
    <section aria-labelledby="figures-heading" className="space-y-3">
      <h2 id="figures-heading" className="text-lg font-semibold">
        Headline figures <span className="text-sm font-normal text-ink-soft">at zenith, 500 nm</span>
      </h2>
      <SummaryWarnings warnings={summary.warnings} />
      {summary.empty ? null : (
        <dl className="grid grid-cols-2 gap-3 md:grid-cols-3 xl:grid-cols-6" data-testid="headline-figures">
          <Figure
            label="Median seeing"
            value={formatArcsec(summary.seeing.median)}
            detail={
              summary.seeing.medianCi95 === null
                ? (summary.interval.reason ?? "no interval")
                : `95 % interval ${formatArcsec(summary.seeing.medianCi95[0])} – ${formatArcsec(summary.seeing.medianCi95[1])}${summary.interval.status === "approximate" ? " (approximate: few nights)" : ""}`
            }
          />
          <Figure label="Quartiles" value={`${formatArcsec(summary.seeing.p25)} – ${formatArcsec(summary.seeing.p75)}`} detail="25th to 75th percentile" />
          <Figure label="Median Fried parameter r0" value={`${formatNumber(summary.r0.median, 1)} cm`} detail={`quartiles ${formatNumber(summary.r0.p25, 1)} – ${formatNumber(summary.r0.p75, 1)} cm`} />
          <Figure label="Samples below 0.8″" value={formatPercent(summary.fractionBelow["0.8"], 1)} detail={`below 0.6″: ${formatPercent(summary.fractionBelow["0.6"], 1)}`} />
          <Figure label="Nights" value={formatNumber(summary.nights)} detail="with accepted samples" />
          <Figure label="Samples used" value={formatNumber(samples.accepted)} detail={`of ${formatNumber(samples.read)} read`} />
        </dl>
      )}
      <p className="text-sm text-ink-soft" data-testid="sample-accounting">
        {formatNumber(samples.accepted)} of {formatNumber(samples.read)} samples used
        {reasons.length > 0 ? "; set aside: " : "."}
        {reasons.map(([reason, count], index) => (
          <span key={reason}>
            {index > 0 ? ", " : ""}
            {formatNumber(count)} <Reason reason={reason} />
          </span>
        ))}
        {reasons.length > 0 ? "." : ""}
        {wavelengths.length > 1 ? ` Campaigns measured at ${wavelengths.join(" and ")} nm; all figures are scaled to 500 nm.` : null}
        {summary.includesIngestRejections ? " Rows rejected while reading the files are included." : " Rows rejected while reading the files are not included when a date window is set (they have no usable time)."}
      </p>
    </section>
  );
}
