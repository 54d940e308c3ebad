import type { ComparisonPair, ComparisonResponse } from "@calmcrest/contracts";
import { formatArcsec, formatNumber } from "../../lib/format";
import { OnDemandDifferenceHistogram } from "../on-demand";

const signed = (valueArcsec: number | null | undefined) =>
  valueArcsec === null || valueArcsec === undefined ? "–" : `${valueArcsec > 0 ? "+" : valueArcsec < 0 ? "−" : ""}${Math.abs(valueArcsec).toFixed(2)}″`;
const pText = (pValue: number) => (pValue < 0.001 ? "p < 0.001" : `p = ${String(Number(pValue.toPrecision(2)))}`);

/** Season by season: median and nights in each of the four seasons of each site's hemisphere. */
export function SeasonBlock({ comparison }: { comparison: ComparisonResponse }) {
  const codes = ["DJF", "MAM", "JJA", "SON"] as const;
  return (
    <section aria-labelledby="seasons-heading" className="space-y-2">
      <h2 id="seasons-heading" className="text-lg font-semibold">
        Season by season
      </h2>
      <p className="max-w-3xl text-sm text-ink-soft">
        The four three-month seasons (December–February, March–May, June–August, September–November), named for each site's hemisphere. A season a site has
        no nights in is shown as a dash: compare sites within a season where both have nights.
      </p>
      <div className="relative overflow-x-auto rounded-lg border border-line bg-panel" tabIndex={0} role="region" aria-label="Seasons table (scrolls sideways)">
        <table className="min-w-full text-sm">
          <thead>
            <tr className="border-b border-line text-left">
              <th scope="col" className="px-3 py-2 font-semibold">
                {comparison.kind === "sites" ? "Site" : "Campaign"}
              </th>
              {codes.map((code) => (
                <th key={code} scope="col" className="px-3 py-2 text-right font-semibold whitespace-nowrap">
                  {code}
                  <span className="block text-xs font-normal text-ink-soft">median (″) · nights</span>
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {comparison.rows.map((row) => (
              <tr key={row.key} className="border-t border-line">
                <th scope="row" className="px-3 py-2 text-left font-semibold">
                  {row.label}
                </th>
                {codes.map((code) => {
                  const season = row.statistics?.seasons.find((entry) => entry.code === code);
                  return (
                    <td key={code} className="num px-3 py-2 whitespace-nowrap">
                      {season && season.nights > 0 ? (
                        <>
                          {formatArcsec(season.median)} · {formatNumber(season.nights)}
                          {season.name ? <span className="block text-xs text-ink-soft">{season.name}</span> : null}
                        </>
                      ) : (
                        "–"
                      )}
                    </td>
                  );
                })}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </section>
  );
}

function PairCard({ comparison, pair }: { comparison: ComparisonResponse; pair: ComparisonPair }) {
  const nameA = comparison.rows[pair.a]?.label ?? pair.aKey;
  const nameB = comparison.rows[pair.b]?.label ?? pair.bKey;
  const paired = pair.paired;
  const unpaired = pair.unpaired;
  return (
    <article className="space-y-3 rounded-lg border border-line bg-panel p-4" aria-label={`${nameA} and ${nameB}`}>
      <h3 className="font-semibold">
        {nameA} and {nameB}
      </h3>
      {paired === null ? (
        <p className="text-sm">One of the two has no samples in this window, so there is nothing to compare.</p>
      ) : (
        <div className="grid gap-4 lg:grid-cols-2">
          <div className="space-y-2">
            <p className="text-xs font-semibold uppercase tracking-wide text-ink-soft">On the nights both ran{paired.matching === "bins" ? ` (only the ${paired.binMinutes ?? 10}-minute spans both ran)` : ""}</p>
            <p className="font-semibold" data-testid="paired-verdict">
              {paired.sentence}
            </p>
            {paired.commonNights > 0 ? (
              <p className="text-sm text-ink-soft">
                Medians on the common nights: {nameA} {formatArcsec(paired.medianA)}, {nameB} {formatArcsec(paired.medianB)}. Night-by-night differences ({nameA} − {nameB}):
                median {signed(paired.nightlyDifferences.median)}, middle half {signed(paired.nightlyDifferences.p25)} to {signed(paired.nightlyDifferences.p75)}.
              </p>
            ) : null}
          </div>
          <div className="space-y-2 rounded-md bg-paper p-3">
            <p className="text-xs font-semibold uppercase tracking-wide text-ink-soft">Unpaired, whole windows</p>
            {unpaired ? (
              <>
                <p className="text-sm">
                  {nameA} − {nameB}: {signed(unpaired.medianDifferenceArcsec)} in median seeing (95 % interval {signed(unpaired.ci95[0])} to {signed(unpaired.ci95[1])}; Mann–Whitney on{" "}
                  {formatNumber(unpaired.mannWhitney.nightsA)} and {formatNumber(unpaired.mannWhitney.nightsB)} nightly medians {pText(unpaired.mannWhitney.pValue)}).
                </p>
                <p className="text-xs text-ink-soft">{unpaired.note}</p>
              </>
            ) : (
              <p className="text-sm">–</p>
            )}
          </div>
        </div>
      )}
      {pair.warnings.length > 0 ? (
        <ul className="space-y-1 text-xs text-warn">
          {pair.warnings.map((warning) => (
            <li key={warning.code} className="flex gap-1.5">
              <span aria-hidden="true">⚠</span>
              <span>{warning.message}</span>
            </li>
          ))}
        </ul>
      ) : null}
      {paired && paired.commonNights > 0 ? <OnDemandDifferenceHistogram pair={pair} nameA={nameA} nameB={nameB} /> : null}
    </article>
  );
}

/** Every pair: the paired verdict in words beside the unpaired figures and their caveat, and the nightly differences. */
export function PairsSection({ comparison }: { comparison: ComparisonResponse }) {
  return (
    <section aria-labelledby="pairs-heading" className="space-y-3">
      <h2 id="pairs-heading" className="text-lg font-semibold">
        Pair by pair
      </h2>
      <p className="max-w-3xl text-sm text-ink-soft">
        Paired figures use only the nights both monitors ran ({comparison.method.paired}); the 95 % interval comes from resampling those nights together (
        {formatNumber(comparison.method.bootstrap.replicates)} replicates, seed {comparison.method.bootstrap.seed}). Below 10 common nights there is no verdict.
      </p>
      <div className="grid gap-4">
        {comparison.pairs.map((pair) => (
          <PairCard key={`${pair.aKey}|${pair.bKey}`} comparison={comparison} pair={pair} />
        ))}
      </div>
    </section>
  );
}
