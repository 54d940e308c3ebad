import { useSuspenseQuery } from "@tanstack/react-query";
import { COMPARISON_MAX_ITEMS, COMPARISON_MIN_ITEMS } from "@calmcrest/contracts";
import { sitesQuery } from "../../api/sites";

// Chooses what a report compares: 2 to 6 sites and an optional date window. Other settings that came with the
// comparison (campaigns, filters, telescope, pairing, e.g. from the Compare page's address) are kept as they are.

export type ComparisonSettings = Record<string, string>;

const selectedSites = (settings: ComparisonSettings) => (settings.sites ?? "").split(",").filter((part) => part !== "").map(Number);

export function ComparisonPicker({ value, onChange, idPrefix }: { value: ComparisonSettings; onChange: (next: ComparisonSettings) => void; idPrefix: string }) {
  const { data: sites } = useSuspenseQuery(sitesQuery);
  const chosen = selectedSites(value);
  const byCampaign = value.campaigns !== undefined && value.campaigns !== "";
  const toggle = (siteId: number) => {
    const next = chosen.includes(siteId) ? chosen.filter((id) => id !== siteId) : [...chosen, siteId];
    const { campaigns: _dropped, ...rest } = value;
    onChange({ ...rest, sites: next.join(",") });
  };
  const setDate = (key: "from" | "to", date: string) => {
    const { [key]: _old, ...rest } = value;
    onChange(date ? { ...rest, [key]: date } : rest);
  };
  const extra = Object.entries(value).filter(([key]) => !["sites", "campaigns", "from", "to"].includes(key));
  return (
    <fieldset className="space-y-3">
      <legend className="text-sm font-semibold">
        What the report compares ({COMPARISON_MIN_ITEMS} to {COMPARISON_MAX_ITEMS} sites)
      </legend>
      {byCampaign ? (
        <p className="text-sm text-ink-soft">
          Campaigns {value.campaigns} (chosen on the Compare page). Tick sites instead to compare whole sites.
        </p>
      ) : null}
      {sites.length === 0 ? <p className="text-sm text-ink-soft">No sites exist yet. Add sites and upload logs first.</p> : null}
      <div className="flex flex-wrap gap-2">
        {sites.map((site) => (
          <label key={site.id} className={`flex cursor-pointer items-center gap-2 rounded-md border px-3 py-1 text-sm ${chosen.includes(site.id) ? "border-accent bg-accent-pale" : "border-line bg-panel"}`}>
            <input type="checkbox" checked={chosen.includes(site.id)} onChange={() => toggle(site.id)} />
            {site.name}
          </label>
        ))}
      </div>
      <div className="flex flex-wrap gap-3">
        <label className="text-sm" htmlFor={`${idPrefix}-from`}>
          <span className="block font-semibold">From (UTC date, optional)</span>
          <input id={`${idPrefix}-from`} type="date" value={value.from ?? ""} onChange={(event) => setDate("from", event.target.value)} className="mt-1 rounded-md border border-line bg-panel px-2 py-1" />
        </label>
        <label className="text-sm" htmlFor={`${idPrefix}-to`}>
          <span className="block font-semibold">To (UTC date, optional)</span>
          <input id={`${idPrefix}-to`} type="date" value={value.to ?? ""} onChange={(event) => setDate("to", event.target.value)} className="mt-1 rounded-md border border-line bg-panel px-2 py-1" />
        </label>
      </div>
      {extra.length > 0 ? <p className="text-xs text-ink-soft">Also kept from the Compare page: {extra.map(([key, setting]) => `${key} = ${setting}`).join(", ")}.</p> : null}
    </fieldset>
  );
}
