import { useState, type FormEvent } from "react";
import { useSearchParams } from "react-router-dom";
import { summaryQuerySchema, type SummaryQuery } from "@calmcrest/contracts";
import { DEFAULT_ANISOTROPY_RATIO_LIMIT, DEFAULT_FILTERS } from "@calmcrest/seeing-stats";
import { FILTER_PARAM_NAMES, filtersFromParams, hasFilters, paramsWithFilters, type FilterParamName } from "../lib/filter-params";

type Draft = Record<FilterParamName, string>;

// Placeholders show the engine's defaults (what applies when a field is left empty).
const FIELDS: { name: Exclude<FilterParamName, "keepAnisotropic">; label: string; unit?: string; type: "date" | "number"; placeholder?: string; help: string; step?: string }[] = [
  { name: "from", label: "From", type: "date", help: "First night included (UTC date)." },
  { name: "to", label: "To", type: "date", help: "Last day included (UTC date)." },
  { name: "maxZenithDeg", label: "Zenith limit", unit: "°", type: "number", placeholder: String(DEFAULT_FILTERS.maxZenithDeg), help: "Samples pointed further from the zenith are set aside.", step: "any" },
  { name: "sunMaxDeg", label: "Sun limit", unit: "°", type: "number", placeholder: String(DEFAULT_FILTERS.sunMaxDeg), help: "Samples taken with the sun higher than this are set aside.", step: "any" },
  { name: "minFlux", label: "Flux minimum", unit: "counts", type: "number", placeholder: DEFAULT_FILTERS.minFlux === null ? "none" : String(DEFAULT_FILTERS.minFlux), help: "Samples of fainter stars are set aside.", step: "any" },
];

const draftFrom = (filters: SummaryQuery): Draft =>
  Object.fromEntries(FILTER_PARAM_NAMES.map((name) => [name, filters[name] === undefined ? "" : String(filters[name])])) as Draft;

/** A message as shown under its field: the field's own label says which setting, so the API's parameter name goes. */
export const onScreen = (message: string) => message.replace(/ \((maxZenithDeg|sunMaxDeg|minFlux)\)/g, "");

/** Reads the filters from the page address (with the problems of a mistyped link). */
export function useFilterParams() {
  const [searchParams] = useSearchParams();
  return filtersFromParams(searchParams);
}

/**
 * The date window and sample filters. They live in the page address, so applying them updates every chart and
 * figure that reads the address and the view can be shared as a link.
 */
export function FilterPanel() {
  const [searchParams, setSearchParams] = useSearchParams();
  const { filters, problems } = filtersFromParams(searchParams);
  const key = FILTER_PARAM_NAMES.map((name) => searchParams.get(name) ?? "").join("|");
  return <FilterForm key={key} filters={filters} linkProblems={problems} onApply={(next) => setSearchParams(paramsWithFilters(searchParams, next))} />;
}

function FilterForm({ filters, linkProblems, onApply }: { filters: SummaryQuery; linkProblems: string[]; onApply: (filters: SummaryQuery) => void }) {
  const [draft, setDraft] = useState<Draft>(() => draftFrom(filters));
  const [errors, setErrors] = useState<Partial<Record<string, string>>>({});

  const submit = (event: FormEvent) => {
    event.preventDefault();
    const values = Object.fromEntries(FILTER_PARAM_NAMES.filter((name) => draft[name].trim() !== "").map((name) => [name, draft[name].trim()]));
    const parsed = summaryQuerySchema.safeParse(values);
    if (!parsed.success) {
      setErrors(Object.fromEntries(parsed.error.issues.map((issue) => [String(issue.path[0] ?? "form"), onScreen(issue.message)])));
      return;
    }
    setErrors({});
    onApply(parsed.data);
  };

  return (
    <form onSubmit={submit} aria-labelledby="filters-heading" className="rounded-lg border border-line bg-panel p-4" noValidate>
      <div className="mb-3 flex flex-wrap items-baseline justify-between gap-2">
        <h2 id="filters-heading" className="text-lg font-semibold">
          Date window and filters
        </h2>
        <p className="text-sm text-ink-soft">
          {hasFilters(filters) ? "Figures below use these settings." : "Showing all dates with the standard filters (zenith 60°, sun −18°, anisotropic samples left out)."}
        </p>
      </div>
      {linkProblems.length > 0 ? (
        <ul role="alert" className="mb-3 rounded-md bg-warn-pale px-3 py-2 text-sm text-warn">
          {linkProblems.map((problem) => (
            <li key={problem}>{problem}</li>
          ))}
        </ul>
      ) : null}
      <div className="grid grid-cols-2 gap-4 md:grid-cols-3 lg:grid-cols-5">
        {FIELDS.map((field) => {
          const error = errors[field.name];
          return (
            <div key={field.name}>
              <label htmlFor={`filter-${field.name}`} className="block text-sm font-semibold">
                {field.label}
                {field.unit ? <span className="font-normal text-ink-soft"> ({field.unit})</span> : null}
              </label>
              <input
                id={`filter-${field.name}`}
                type={field.type}
                step={field.step}
                inputMode={field.type === "number" ? "decimal" : undefined}
                placeholder={field.placeholder}
                value={draft[field.name]}
                onChange={(event) => setDraft({ ...draft, [field.name]: event.target.value })}
                aria-invalid={error ? true : undefined}
                aria-describedby={`filter-${field.name}-help`}
                className="mt-1 w-full rounded-md border border-line bg-panel px-3 py-1.5 text-right tabular-nums"
              />
              <p id={`filter-${field.name}-help`} className={`mt-1 text-xs ${error ? "text-bad" : "text-ink-soft"}`}>
                {error ?? field.help}
              </p>
            </div>
          );
        })}
      </div>
      <div className="mt-3">
        <label className="inline-flex items-start gap-2 text-sm">
          <input
            type="checkbox"
            className="mt-1"
            checked={draft.keepAnisotropic === "true"}
            onChange={(event) => setDraft({ ...draft, keepAnisotropic: event.target.checked ? "true" : "" })}
            aria-describedby="filter-keepAnisotropic-help"
          />
          <span>
            <span className="font-semibold">Keep anisotropic samples</span>
            <span id="filter-keepAnisotropic-help" className="block text-xs text-ink-soft">
              Samples whose longitudinal and transverse seeing differ by more than a ratio of {DEFAULT_ANISOTROPY_RATIO_LIMIT} (a wind-shaken monitor) are set aside unless this is ticked.
            </span>
          </span>
        </label>
      </div>
      <div className="mt-3 flex flex-wrap gap-2">
        <button type="submit" className="rounded-md bg-accent px-4 py-1.5 font-semibold text-white hover:bg-accent-strong">
          Apply
        </button>
        <button
          type="button"
          onClick={() => {
            // Clear what is typed too: when the address already holds the standard settings, nothing else would.
            setDraft(draftFrom({}));
            setErrors({});
            onApply({});
          }}
          className="rounded-md border border-line px-4 py-1.5 font-semibold hover:bg-paper"
        >
          Reset to standard
        </button>
      </div>
    </form>
  );
}
