import { useState, type FormEvent } from "react";
import { COMPARISON_MAX_ITEMS, COMPARISON_MIN_ITEMS, DEFAULT_BAND_NM, DEFAULT_OUTER_SCALE_M, type SiteListItem } from "@calmcrest/contracts";
import type { CompareSelection } from "../../lib/compare-params";

export interface PickableCampaign {
  id: number;
  name: string;
  siteName: string;
}

type Draft = { kind: CompareSelection["kind"]; sites: number[]; campaigns: number[]; apertureM: string; bandNm: string; outerScaleM: string; pairing: CompareSelection["pairing"] };

const TELESCOPE_FIELDS = [
  { name: "apertureM", label: "Aperture", unit: "m", placeholder: "large", help: "Primary mirror diameter; leave empty for a telescope much larger than the outer scale allows for." },
  { name: "bandNm", label: "Band", unit: "nm", placeholder: String(DEFAULT_BAND_NM), help: "Wavelength the telescope will observe at (500 nm visible, 2200 nm K band)." },
  { name: "outerScaleM", label: "Outer scale L0", unit: "m", placeholder: String(DEFAULT_OUTER_SCALE_M), help: "Turbulence outer scale of the von Kármán model; 25 m unless measured." },
] as const;

/**
 * What to compare: whole sites or single campaigns (2 to 6), the planned telescope and how nights are paired.
 * Applying writes everything into the page address, so a comparison can be bookmarked and sent.
 */
export function ComparePicker({
  selection,
  sites,
  campaigns,
  campaignsPending,
  onApply,
}: {
  selection: CompareSelection;
  sites: SiteListItem[];
  campaigns: PickableCampaign[];
  campaignsPending: boolean;
  onApply: (selection: CompareSelection) => void;
}) {
  const [draft, setDraft] = useState<Draft>(() => ({
    kind: selection.kind,
    sites: selection.kind === "sites" ? selection.ids : [],
    campaigns: selection.kind === "campaigns" ? selection.ids : [],
    apertureM: selection.apertureM === null ? "" : String(selection.apertureM),
    bandNm: selection.bandNm === DEFAULT_BAND_NM ? "" : String(selection.bandNm),
    outerScaleM: selection.outerScaleM === DEFAULT_OUTER_SCALE_M ? "" : String(selection.outerScaleM),
    pairing: selection.pairing,
  }));
  const [errors, setErrors] = useState<Partial<Record<string, string>>>({});
  const chosen = draft.kind === "sites" ? draft.sites : draft.campaigns;
  const options = draft.kind === "sites" ? sites.map((site) => ({ id: site.id, label: site.name, detail: site.summary ? `${site.summary.nights} nights` : "no data yet" })) : campaigns.map((campaign) => ({ id: campaign.id, label: `${campaign.siteName} — ${campaign.name}`, detail: "" }));

  const toggle = (id: number) => {
    const list = chosen.includes(id) ? chosen.filter((other) => other !== id) : [...chosen, id];
    setDraft(draft.kind === "sites" ? { ...draft, sites: list } : { ...draft, campaigns: list });
  };

  const submit = (event: FormEvent) => {
    event.preventDefault();
    const problems: Record<string, string> = {};
    if (chosen.length < COMPARISON_MIN_ITEMS || chosen.length > COMPARISON_MAX_ITEMS) {
      problems.items = `Choose ${COMPARISON_MIN_ITEMS} to ${COMPARISON_MAX_ITEMS} ${draft.kind === "sites" ? "sites" : "campaigns"}; ${chosen.length} ${chosen.length === 1 ? "is" : "are"} chosen.`;
    }
    const numbers: Record<string, number | null> = {};
    for (const field of TELESCOPE_FIELDS) {
      const text = draft[field.name].trim();
      const value = Number(text);
      if (text === "") numbers[field.name] = null;
      else if (!Number.isFinite(value) || value <= 0) problems[field.name] = `${field.label} must be a positive number of ${field.unit === "m" ? "metres" : "nanometres"}.`;
      else numbers[field.name] = value;
    }
    setErrors(problems);
    if (Object.keys(problems).length > 0) return;
    onApply({
      kind: draft.kind,
      ids: chosen,
      apertureM: numbers.apertureM ?? null,
      bandNm: numbers.bandNm ?? DEFAULT_BAND_NM,
      outerScaleM: numbers.outerScaleM ?? DEFAULT_OUTER_SCALE_M,
      pairing: draft.pairing,
    });
  };

  return (
    <form onSubmit={submit} aria-labelledby="picker-heading" className="rounded-lg border border-line bg-panel p-4" noValidate>
      <h2 id="picker-heading" className="mb-3 text-lg font-semibold">
        What to compare
      </h2>
      <div className="grid gap-6 lg:grid-cols-[minmax(0,1.2fr)_minmax(0,1fr)]">
        <div>
          <fieldset className="mb-3 flex flex-wrap gap-4 text-sm">
            <legend className="sr-only">Compare whole sites or single campaigns</legend>
            {(["sites", "campaigns"] as const).map((kind) => (
              <label key={kind} className="flex items-center gap-2">
                <input type="radio" name="compare-kind" checked={draft.kind === kind} onChange={() => setDraft({ ...draft, kind })} />
                {kind === "sites" ? "Whole sites (all their campaigns)" : "Single campaigns"}
              </label>
            ))}
          </fieldset>
          <fieldset aria-describedby="picker-count">
            <legend className="text-sm font-semibold">
              {draft.kind === "sites" ? "Sites" : "Campaigns"} ({COMPARISON_MIN_ITEMS} to {COMPARISON_MAX_ITEMS})
            </legend>
            {draft.kind === "campaigns" && campaignsPending ? <p className="text-sm text-ink-soft">Loading the campaigns…</p> : null}
            <ul className="mt-2 grid gap-1 sm:grid-cols-2">
              {options.map((option) => {
                const checked = chosen.includes(option.id);
                const full = !checked && chosen.length >= COMPARISON_MAX_ITEMS;
                return (
                  <li key={option.id}>
                    <label className={`flex items-start gap-2 rounded-md px-2 py-1 text-sm ${full ? "text-ink-soft" : "hover:bg-paper"}`}>
                      <input type="checkbox" className="mt-1" checked={checked} disabled={full} onChange={() => toggle(option.id)} />
                      <span>
                        {option.label}
                        {option.detail ? <span className="block text-xs text-ink-soft">{option.detail}</span> : null}
                      </span>
                    </label>
                  </li>
                );
              })}
            </ul>
            <p id="picker-count" className={`mt-2 text-xs ${errors.items ? "text-bad" : "text-ink-soft"}`} role={errors.items ? "alert" : undefined}>
              {errors.items ?? `${chosen.length} chosen${chosen.length >= COMPARISON_MAX_ITEMS ? ` (at most ${COMPARISON_MAX_ITEMS})` : ""}.`}
            </p>
          </fieldset>
        </div>
        <div>
          <fieldset>
            <legend className="text-sm font-semibold">Planned telescope</legend>
            <div className="mt-2 grid grid-cols-1 gap-3 sm:grid-cols-3">
              {TELESCOPE_FIELDS.map((field) => (
                <div key={field.name}>
                  <label htmlFor={`telescope-${field.name}`} className="block text-sm">
                    {field.label} <span className="text-ink-soft">({field.unit})</span>
                  </label>
                  <input
                    id={`telescope-${field.name}`}
                    type="number"
                    step="any"
                    min="0"
                    inputMode="decimal"
                    placeholder={field.placeholder}
                    value={draft[field.name]}
                    onChange={(event) => setDraft({ ...draft, [field.name]: event.target.value })}
                    aria-invalid={errors[field.name] ? true : undefined}
                    aria-describedby={`telescope-${field.name}-help`}
                    className="mt-1 w-full rounded-md border border-line bg-panel px-3 py-1.5 text-right tabular-nums"
                  />
                  <p id={`telescope-${field.name}-help`} className={`mt-1 text-xs ${errors[field.name] ? "text-bad" : "text-ink-soft"}`}>
                    {errors[field.name] ?? field.help}
                  </p>
                </div>
              ))}
            </div>
          </fieldset>
          <label htmlFor="pairing" className="mt-3 block text-sm font-semibold">
            Pairing of nights
          </label>
          <select
            id="pairing"
            value={draft.pairing}
            onChange={(event) => setDraft({ ...draft, pairing: event.target.value === "bins" ? "bins" : "nights" })}
            className="mt-1 w-full rounded-md border border-line bg-panel px-3 py-1.5 text-sm"
          >
            <option value="nights">Every night both monitors ran</option>
            <option value="bins">Only the 10-minute spans both monitors ran</option>
          </select>
        </div>
      </div>
      <button type="submit" className="mt-4 rounded-md bg-accent px-4 py-1.5 font-semibold text-white hover:bg-accent-strong">
        Compare
      </button>
    </form>
  );
}
