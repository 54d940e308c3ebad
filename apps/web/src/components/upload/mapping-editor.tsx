import { LOG_FIELD_INFO, checkMapping, type ColumnMapping, type LogField } from "@calmcrest/seeing-stats";
import { unitsOfMapping, withUnits, type PointingKind, type VarianceUnit } from "../../lib/log-head";

const OPTIONAL_GROUP = "Optional columns";

const GROUPS: { title: string; help: string; fields: (units: { variance: VarianceUnit; pointing: PointingKind }) => LogField[] }[] = [
  { title: "Time", help: "Needed: when each sample was taken (UTC). A log with the date and the time of day in two columns maps both.", fields: () => ["time_utc", "date_utc"] },
  {
    title: "Seeing measure",
    help: "Needed: both image-motion variances, or the seeing the monitor computed, or r0. Monitors that alternate two exposure times may add both variances at twice the exposure time, to extrapolate the seeing to zero exposure.",
    fields: (units) =>
      units.variance === "px2"
        ? ["var_long_px2", "var_trans_px2", "var_long_2x_px2", "var_trans_2x_px2", "seeing_arcsec", "r0_cm"]
        : ["var_long_arcsec2", "var_trans_arcsec2", "var_long_2x_arcsec2", "var_trans_2x_arcsec2", "seeing_arcsec", "r0_cm"],
  },
  { title: "Pointing", help: "Needed: where the star was, to reduce every sample to zenith.", fields: (units) => [units.pointing === "airmass" ? "airmass" : "zenith_deg"] },
  { title: OPTIONAL_GROUP, help: "Kept with each sample when present.", fields: () => ["flux", "scint_index", "tau0_ms", "theta0_arcsec", "wind_ms", "rh_pct"] },
];

/** The measure a mapping reads the seeing from, as the engine chooses it (variances first), or null when none is mapped yet. */
export function measureOfMapping(mapping: ColumnMapping): "variances" | "seeing" | "r0" | null {
  if (mapping.var_long_arcsec2 || mapping.var_trans_arcsec2 || mapping.var_long_px2 || mapping.var_trans_px2) return "variances";
  if (mapping.seeing_arcsec) return "seeing";
  if (mapping.r0_cm) return "r0";
  return null;
}

/** The file's own measurement wavelength as the person types it (the wizard page holds it). */
export interface WavelengthField {
  text: string;
  onChange: (text: string) => void;
  problem: string | null;
}

/**
 * Which column of the file holds which Calmcrest field, and in which units. Changes are reported whole, and the
 * problems (from the engine's checkMapping, the same rules the server applies) are listed under the table.
 */
export function MappingEditor({
  headers,
  rows,
  mapping,
  onChange,
  pixelScaleArcsec,
  wavelengthNm,
  wavelength,
}: {
  headers: string[];
  rows: Record<string, string>[];
  mapping: ColumnMapping;
  onChange: (mapping: ColumnMapping) => void;
  /** From the campaign's monitor; pixel² variances need it. */
  pixelScaleArcsec: number | null;
  /** The campaign monitor's wavelength. */
  wavelengthNm: number;
  /** When given, the wavelength is editable for a seeing or r0 file (variances do not depend on it). */
  wavelength?: WavelengthField | undefined;
}) {
  const units = unitsOfMapping(mapping);
  const measure = measureOfMapping(mapping);
  const problems = checkMapping(mapping, headers);
  if (units.variance === "px2" && pixelScaleArcsec === null && (mapping.var_long_px2 || mapping.var_trans_px2)) {
    problems.push("Variances in pixel² need the monitor's pixel scale, and this campaign has none. Ask the survey lead to enter it on the campaign, or map variances in arcsec².");
  }
  const setField = (field: LogField, header: string) => {
    const next: ColumnMapping = { ...mapping };
    if (header === "") delete next[field];
    else next[field] = header;
    onChange(next);
  };
  const examples = (header: string | undefined) =>
    header === undefined
      ? ""
      : rows
          .slice(0, 3)
          .map((row) => row[header] ?? "")
          .join(" · ");
  const unmapped = headers.filter((header) => !Object.values(mapping).includes(header));

  return (
    <div className="space-y-5">
      <fieldset className="grid gap-4 rounded-lg border border-line bg-paper p-3 md:grid-cols-3">
        <legend className="px-1 text-sm font-semibold">Units in this file</legend>
        {/* Only what the file's measure needs: the variance unit for variances, the wavelength for seeing or r0. */}
        {measure === null || measure === "variances" ? (
        <div role="radiogroup" aria-label="Variance unit" className="space-y-1 text-sm">
          <p className="font-semibold">Image-motion variances in</p>
          {(
            [
              ["arcsec2", "arcsec²"],
              ["px2", `pixel² (× pixel scale ${pixelScaleArcsec === null ? "not set" : `${pixelScaleArcsec} ″/px`})`],
            ] as const
          ).map(([value, label]) => (
            <label key={value} className="flex items-center gap-2">
              <input type="radio" name="variance-unit" checked={units.variance === value} onChange={() => onChange(withUnits(mapping, { ...units, variance: value }))} />
              {label}
            </label>
          ))}
        </div>
        ) : null}
        <div role="radiogroup" aria-label="Pointing" className="space-y-1 text-sm">
          <p className="font-semibold">Star position given as</p>
          {(
            [
              ["zenith", "zenith angle (degrees)"],
              ["airmass", "airmass (sec z)"],
            ] as const
          ).map(([value, label]) => (
            <label key={value} className="flex items-center gap-2">
              <input type="radio" name="pointing" checked={units.pointing === value} onChange={() => onChange(withUnits(mapping, { ...units, pointing: value }))} />
              {label}
            </label>
          ))}
        </div>
        {measure === "variances" ? (
          <div className="text-sm">
            <p className="font-semibold">Measurement wavelength</p>
            <p className="text-ink-soft">Not needed: seeing from image-motion variances does not depend on it. Every figure is given at 500 nm and zenith.</p>
          </div>
        ) : wavelength && measure !== null ? (
          <label className="block text-sm">
            <span className="block font-semibold">Measurement wavelength of this file (nm)</span>
            <input
              value={wavelength.text}
              onChange={(event) => wavelength.onChange(event.target.value)}
              inputMode="decimal"
              placeholder={String(wavelengthNm)}
              aria-invalid={wavelength.problem ? true : undefined}
              className="mt-1 w-28 rounded-md border border-line bg-panel px-2 py-1 tabular-nums"
            />
            <span className="mt-1 block text-ink-soft">
              Empty: the campaign's {wavelengthNm} nm. The {measure === "r0" ? "r0" : "seeing"} is scaled to 500 nm ({measure === "r0" ? "r0 ∝ λ^6/5" : "seeing ∝ λ^−1/5"}) and to zenith.
            </span>
            {wavelength.problem ? (
              <span role="alert" className="mt-1 block text-bad">
                {wavelength.problem}
              </span>
            ) : null}
          </label>
        ) : (
          <div className="text-sm">
            <p className="font-semibold">Measurement wavelength</p>
            <p className="tabular-nums">{wavelengthNm} nm</p>
            <p className="text-ink-soft">From the campaign's monitor settings; every figure is scaled to 500 nm and zenith.</p>
          </div>
        )}
      </fieldset>

      {/* A narrow screen scrolls the table inside its box, never the page. */}
      <div className="overflow-x-auto">
      <table className="w-full border-collapse text-sm">
        <caption className="sr-only">Column mapping</caption>
        <thead>
          <tr className="border-b border-line text-left">
            <th scope="col" className="py-2 pr-3">Calmcrest field</th>
            <th scope="col" className="py-2 pr-3">Column in the file</th>
            <th scope="col" className="py-2">First values</th>
          </tr>
        </thead>
        {GROUPS.map((group) => (
          <tbody key={group.title}>
            <tr>
              <th colSpan={3} scope="rowgroup" className="pt-4 pb-1 text-left">
                {group.title} <span className="font-normal text-ink-soft">— {group.help}</span>
              </th>
            </tr>
            {group.fields(units).map((field) => {
              const info = LOG_FIELD_INFO[field];
              const selectId = `map-${field}`;
              return (
                <tr key={field} className="border-b border-line/60">
                  <td className="py-1.5 pr-3">
                    <label htmlFor={selectId}>
                      {/* Optional rows inside a needed group say so, so nobody hunts for a column their monitor never writes. */}
                      <span className="font-semibold">{info.label}</span> <span className="text-ink-soft">{unitNote(info.label, info.unit, info.required === "optional" && group.title !== OPTIONAL_GROUP)}</span>
                      <span className="block font-mono text-xs text-ink-soft">{field}</span>
                    </label>
                  </td>
                  <td className="py-1.5 pr-3">
                    <select id={selectId} value={mapping[field] ?? ""} onChange={(event) => setField(field, event.target.value)} className="w-full min-w-40 rounded-md border border-line bg-panel px-2 py-1">
                      <option value="">— not in this file —</option>
                      {headers.map((header) => (
                        <option key={header} value={header}>
                          {header}
                        </option>
                      ))}
                    </select>
                  </td>
                  <td className="min-w-48 py-1.5 font-mono text-xs text-ink-soft">{examples(mapping[field])}</td>
                </tr>
              );
            })}
          </tbody>
        ))}
      </table>
      </div>
      {unmapped.length > 0 ? <p className="text-sm text-ink-soft">Columns not used: {unmapped.map((header) => `“${header}”`).join(", ")}.</p> : null}
      {problems.length > 0 ? (
        <ul role="alert" aria-label="Mapping problems" className="space-y-1 rounded-md border border-bad/40 bg-bad-pale px-3 py-2 text-sm text-bad">
          {problems.map((problem) => (
            <li key={problem}>{problem}</li>
          ))}
        </ul>
      ) : (
        <p role="status" className="rounded-md bg-accent-pale px-3 py-2 text-sm text-accent-strong">
          Every needed field has a column. Whether the rows can be read is checked below, row by row.
        </p>
      )}
    </div>
  );
}

/**
 * The unit after a field's label, unless the label names it already ("Airmass of the star (sec z)" needs no second
 * "(sec z)"), plus "optional" where that is worth saying. Empty when there is nothing to add.
 */
export function unitNote(label: string, unit: string, optional: boolean): string {
  const parts = [...(label.includes(unit) ? [] : [unit]), ...(optional ? ["optional"] : [])];
  return parts.length === 0 ? "" : `(${parts.join(", ")})`;
}

/** Problems that block the upload (the editor lists the same ones). */
export function mappingProblems(mapping: ColumnMapping, headers: readonly string[], pixelScaleArcsec: number | null): string[] {
  const problems = checkMapping(mapping, headers);
  if ((mapping.var_long_px2 || mapping.var_trans_px2) && pixelScaleArcsec === null) problems.push("Variances in pixel² need the campaign's pixel scale.");
  return problems;
}
