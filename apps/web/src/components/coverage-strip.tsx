import { coverageByMonth } from "../lib/coverage";

/** A row of month cells; the filled height shows the share of nights observed, an empty cell is a month with no data. */
export function CoverageStrip({ nights, fromMonth, toMonth, label }: { nights: readonly string[]; fromMonth?: string; toMonth?: string; label: string }) {
  const months = coverageByMonth(nights, fromMonth, toMonth);
  if (months.length === 0) return <p className="text-sm text-ink-soft">No observed nights in this period.</p>;
  const observed = months.reduce((total, month) => total + month.observedNights, 0);
  const gaps = months.filter((month) => month.observedNights === 0).length;
  return (
    <figure aria-label={label} className="space-y-1">
      <ol className="flex items-end gap-1" aria-hidden="false">
        {months.map((month) => {
          const share = month.observedNights / month.daysInMonth;
          return (
            <li
              key={month.month}
              title={`${month.month}: ${month.observedNights} of ${month.daysInMonth} nights observed`}
              className={`relative flex h-10 min-w-6 flex-1 flex-col justify-end overflow-hidden rounded-sm border ${month.observedNights === 0 ? "border-dashed border-bad/60 bg-bad-pale" : "border-line bg-paper"}`}
            >
              <span className="sr-only">
                {month.month}: {month.observedNights} of {month.daysInMonth} nights observed
              </span>
              <span aria-hidden="true" className="block bg-accent" style={{ height: `${Math.round(share * 100)}%` }} />
            </li>
          );
        })}
      </ol>
      <div className="flex justify-between text-xs text-ink-soft" aria-hidden="true">
        <span>{months[0]?.month}</span>
        <span>{months[months.length - 1]?.month}</span>
      </div>
      <figcaption className="text-xs text-ink-soft">
        {observed} nights with data over {months.length} months{gaps > 0 ? `; ${gaps} month${gaps === 1 ? "" : "s"} without any (red dashed)` : ""}. Bar height: share of the month's nights observed.
      </figcaption>
    </figure>
  );
}
