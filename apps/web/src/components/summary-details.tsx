import type { SummaryGroup, SummaryResponse } from "@calmcrest/contracts";
import { formatArcsec, formatNumber, formatPercent } from "../lib/format";

type Statistics = Extract<SummaryResponse, { empty: false }>;

/** What could mislead a reader of these figures, each in a sentence (the summary's warnings[]). */
export function SummaryWarnings({ warnings }: { warnings: SummaryResponse["warnings"] }) {
  if (warnings.length === 0) return null;
  return (
    <div role="note" aria-label="Read these figures with care" className="rounded-lg border border-warn/40 bg-warn-pale p-4" data-testid="summary-warnings">
      <p className="font-semibold">Read these figures with care</p>
      <ul className="mt-1 list-disc space-y-1 pl-5 text-sm text-ink-soft">
        {warnings.map((warning) => (
          <li key={warning.code} data-code={warning.code}>
            {warning.message}
          </li>
        ))}
      </ul>
    </div>
  );
}

const interval = (range: [number, number] | null, format: (value: number) => string, reason: string) =>
  range === null ? reason : `95 % interval ${format(range[0])} – ${format(range[1])}`;

/**
 * Figures that keep long clear nights and well-covered months from dominating: the season-balanced median, the
 * statistics of nightly medians and the time below each threshold with its interval.
 */
export function BalancedFigures({ summary }: { summary: Statistics }) {
  const noInterval = summary.interval.reason ?? "no interval";
  const { seasonBalanced, nightlyMedians } = summary;
  return (
    <section aria-labelledby="balanced-heading" className="space-y-3">
      <h2 id="balanced-heading" className="text-lg font-semibold">
        Balanced over months and nights <span className="text-sm font-normal text-ink-soft">at zenith, 500 nm</span>
      </h2>
      <dl className="grid grid-cols-1 gap-3 sm:grid-cols-2 lg:grid-cols-3 xl:grid-cols-5" data-testid="balanced-figures">
        <div className="rounded-lg border border-line bg-panel px-4 py-3">
          <dt className="text-sm text-ink-soft">Season-balanced median</dt>
          <dd className="mt-1 text-2xl font-semibold tabular-nums">{formatArcsec(seasonBalanced.medianArcsec)}</dd>
          <dd className="mt-0.5 text-sm text-ink-soft">
            every covered calendar month weighs the same
            {seasonBalanced.monthsMissing.length > 0 ? `; no samples in ${seasonBalanced.monthsMissing.join(", ")}` : "; all twelve months covered"}
          </dd>
        </div>
        <div className="rounded-lg border border-line bg-panel px-4 py-3">
          <dt className="text-sm text-ink-soft">Median of nightly medians</dt>
          <dd className="mt-1 text-2xl font-semibold tabular-nums">{formatArcsec(nightlyMedians.median)}</dd>
          <dd className="mt-0.5 text-sm text-ink-soft">
            quartiles {formatArcsec(nightlyMedians.p25)} – {formatArcsec(nightlyMedians.p75)}; each of {formatNumber(nightlyMedians.nights)} nights counts once
          </dd>
        </div>
        {Object.entries(summary.fractionBelow).map(([threshold, fraction]) => (
          <div key={threshold} className="rounded-lg border border-line bg-panel px-4 py-3">
            <dt className="text-sm text-ink-soft">Time below {threshold}″</dt>
            <dd className="mt-1 text-2xl font-semibold tabular-nums">{formatPercent(fraction, 1)}</dd>
            <dd className="mt-0.5 text-sm text-ink-soft">{interval(summary.fractionBelowCi95[threshold] ?? null, (value) => formatPercent(value, 1), noInterval)}</dd>
          </div>
        ))}
      </dl>
    </section>
  );
}

/** Per-season figures, for the site's hemisphere. */
export function SeasonsTable({ summary }: { summary: Statistics }) {
  return (
    <section aria-labelledby="seasons-heading" className="space-y-2">
      <h2 id="seasons-heading" className="text-lg font-semibold">
        By season <span className="text-sm font-normal text-ink-soft">(three-month seasons by night date)</span>
      </h2>
      <div className="overflow-x-auto" tabIndex={0} role="region" aria-label="Seasons table (scrolls sideways on narrow screens)">
        <table className="w-full min-w-[28rem] text-sm tabular-nums">
          <thead className="text-left text-ink-soft">
            <tr>
              <th className="py-1 pr-3 font-semibold">Season</th>
              <th className="py-1 pr-3 text-right font-semibold">Nights</th>
              <th className="py-1 pr-3 text-right font-semibold">Samples</th>
              <th className="py-1 pr-3 text-right font-semibold">Median</th>
              <th className="py-1 text-right font-semibold">Quartiles</th>
            </tr>
          </thead>
          <tbody>
            {summary.seasons.map((season) => (
              <tr key={season.code} className="border-t border-line">
                <td className="py-1 pr-3">
                  {season.code}
                  {season.name ? <span className="text-ink-soft"> ({season.name})</span> : null}
                </td>
                <td className="py-1 pr-3 text-right">{formatNumber(season.nights)}</td>
                <td className="py-1 pr-3 text-right">{formatNumber(season.samples)}</td>
                <td className="py-1 pr-3 text-right">{formatArcsec(season.median)}</td>
                <td className="py-1 text-right">{season.median === null ? "–" : `${formatArcsec(season.p25)} – ${formatArcsec(season.p75)}`}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </section>
  );
}

/** Coherence time and isoplanatic angle, when the logs carry them. */
export function TurbulenceFigures({ summary }: { summary: Statistics }) {
  const rows = [
    { label: "Coherence time τ0", value: summary.tau0, format: (value: number) => `${formatNumber(value, 2)} ms` },
    { label: "Isoplanatic angle θ0", value: summary.theta0, format: (value: number) => formatArcsec(value) },
  ].filter((row) => row.value !== null);
  if (rows.length === 0) return null;
  return (
    <section aria-labelledby="turbulence-heading" className="space-y-2" data-testid="turbulence-figures">
      <h2 id="turbulence-heading" className="text-lg font-semibold">
        Coherence time and isoplanatic angle <span className="text-sm font-normal text-ink-soft">at zenith, 500 nm</span>
      </h2>
      <dl className="grid grid-cols-1 gap-3 sm:grid-cols-2">
        {rows.map(({ label, value, format }) =>
          value === null ? null : (
            <div key={label} className="rounded-lg border border-line bg-panel px-4 py-3">
              <dt className="text-sm text-ink-soft">{label}, median</dt>
              <dd className="mt-1 text-2xl font-semibold tabular-nums">{format(value.median)}</dd>
              <dd className="mt-0.5 text-sm text-ink-soft">
                quartiles {format(value.p25)} – {format(value.p75)}; p10 {format(value.p10)}, p90 {format(value.p90)}; {formatNumber(value.samples)} samples
              </dd>
            </div>
          ),
        )}
      </dl>
    </section>
  );
}

function GroupTable({ title, caption, groups }: { title: string; caption: string; groups: SummaryGroup[] }) {
  return (
    <div className="space-y-1">
      <h3 className="font-semibold">{title}</h3>
      <p className="text-sm text-ink-soft">{caption}</p>
      <div className="overflow-x-auto" tabIndex={0} role="region" aria-label={`${title} (scrolls sideways on narrow screens)`}>
        <table className="w-full min-w-[32rem] text-sm tabular-nums">
          <thead className="text-left text-ink-soft">
            <tr>
              <th className="py-1 pr-3 font-semibold">Group</th>
              <th className="py-1 pr-3 text-right font-semibold">Nights</th>
              <th className="py-1 pr-3 text-right font-semibold">Median</th>
              <th className="py-1 pr-3 text-right font-semibold">Quartiles</th>
              <th className="py-1 text-right font-semibold">Season-balanced</th>
            </tr>
          </thead>
          <tbody>
            {groups.map((group) => (
              <tr key={group.label} className="border-t border-line align-top">
                <td className="py-1 pr-3">{group.label}</td>
                <td className="py-1 pr-3 text-right">{formatNumber(group.nights)}</td>
                <td className="py-1 pr-3 text-right">
                  {formatArcsec(group.median)}
                  <span className="block text-xs text-ink-soft">
                    {group.median === null
                      ? "no sample passes"
                      : group.medianCi95 === null
                        ? (group.interval?.reason ?? "no interval")
                        : `95 %: ${formatArcsec(group.medianCi95[0])} – ${formatArcsec(group.medianCi95[1])}${group.interval?.status === "approximate" ? " (approximate)" : ""}`}
                  </span>
                </td>
                <td className="py-1 pr-3 text-right">{group.median === null ? "–" : `${formatArcsec(group.p25)} – ${formatArcsec(group.p75)}`}</td>
                <td className="py-1 text-right">{formatArcsec(group.seasonBalancedMedian)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </div>
  );
}

/** The figures per campaign or per monitor height, when the pooled figures mix what should not be mixed silently. */
export function GroupFigures({ summary }: { summary: SummaryResponse }) {
  if (summary.byCampaign === null && summary.byHeight === null) return null;
  return (
    <section aria-labelledby="groups-heading" className="space-y-4" data-testid="group-figures">
      <h2 id="groups-heading" className="text-lg font-semibold">
        Not pooled <span className="text-sm font-normal text-ink-soft">seeing at zenith, 500 nm, with the same settings</span>
      </h2>
      {summary.byCampaign ? (
        <GroupTable
          title="Per campaign"
          caption="The campaigns reduce their variances with different response coefficient sets, which moves seeing by 7–10 %."
          groups={summary.byCampaign}
        />
      ) : null}
      {summary.byHeight ? (
        <GroupTable title="Per monitor height" caption="A lower monitor sees more ground-layer turbulence than a higher one." groups={summary.byHeight} />
      ) : null}
    </section>
  );
}
