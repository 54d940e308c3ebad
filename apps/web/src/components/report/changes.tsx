import type { ChangedFigure, VersionChanges } from "@calmcrest/contracts";
import { formatNumber } from "../../lib/format";

// "What changed since version N": numbers that moved (and by how much), rows added or dropped, sections changed.

function value(figure: ChangedFigure, number: number | null): string {
  if (number === null) return "–";
  if (figure.unit === "fraction") return `${(number * 100).toFixed(1)} %`;
  if (figure.unit === "count") return formatNumber(number);
  return number.toFixed(figure.unit === "cm" ? 1 : 3);
}

function change(figure: ChangedFigure): string {
  if (figure.change === null) return "–";
  const sign = figure.change > 0 ? "+" : figure.change < 0 ? "−" : "±";
  const size = Math.abs(figure.change);
  if (figure.unit === "fraction") return `${sign}${(size * 100).toFixed(1)} points`;
  if (figure.unit === "count") return `${sign}${formatNumber(size)}`;
  return `${sign}${size.toFixed(figure.unit === "cm" ? 1 : 3)}`;
}

const SECTION_CHANGE: Record<VersionChanges["sections"][number]["change"], string> = {
  added: "new section",
  removed: "removed",
  renamed: "renamed",
  text: "text changed",
  renamed_and_text: "renamed, text changed",
};

export function ChangesPanel({ changes }: { changes: VersionChanges }) {
  const nothing = changes.figures.length === 0 && changes.sections.length === 0 && !changes.titleChanged && !changes.summaryChanged && changes.subjectsAdded.length === 0 && changes.subjectsRemoved.length === 0;
  return (
    <div className="space-y-3">
      {nothing ? <p className="text-sm">No number and no text changed between version {changes.fromVersion} and version {changes.toVersion}.</p> : null}
      <p className="text-sm">
        Version {changes.toVersion} is computed from {changes.uploadsAdded === 0 ? "no upload" : `${changes.uploadsAdded} upload${changes.uploadsAdded === 1 ? "" : "s"}`} that version {changes.fromVersion} did not include.
        {changes.titleChanged ? " The title changed." : ""}
        {changes.summaryChanged ? " The summary changed." : ""}
      </p>
      {changes.subjectsAdded.length + changes.subjectsRemoved.length > 0 ? (
        <p className="text-sm">
          {changes.subjectsAdded.length > 0 ? `Added to the comparison: ${changes.subjectsAdded.join(", ")}. ` : ""}
          {changes.subjectsRemoved.length > 0 ? `No longer compared: ${changes.subjectsRemoved.join(", ")}.` : ""}
        </p>
      ) : null}
      {changes.sections.length > 0 ? (
        <div>
          <h3 className="text-sm font-semibold">Sections</h3>
          <ul className="mt-1 list-disc pl-5 text-sm">
            {changes.sections.map((section) => (
              <li key={section.id}>
                {section.change === "removed" ? (
                  section.title
                ) : (
                  <a className="text-accent underline" href={`#section-${section.id}`}>
                    {section.title}
                  </a>
                )}
                : {SECTION_CHANGE[section.change]}
                {section.previousTitle ? ` (was “${section.previousTitle}”)` : ""}
              </li>
            ))}
          </ul>
        </div>
      ) : null}
      {changes.figures.length > 0 ? (
        <div className="overflow-x-auto">
          <table className="w-full min-w-[32rem] border-collapse text-sm">
            <caption className="text-left text-sm font-semibold">Numbers that moved (seeing in arcsec at zenith and 500 nm)</caption>
            <thead>
              <tr className="border-b border-line text-left">
                <th scope="col" className="py-1 pr-3">Site or pair</th>
                <th scope="col" className="py-1 pr-3">Figure</th>
                <th scope="col" className="num py-1 pr-3">Version {changes.fromVersion}</th>
                <th scope="col" className="num py-1 pr-3">Version {changes.toVersion}</th>
                <th scope="col" className="num py-1">Change</th>
              </tr>
            </thead>
            <tbody>
              {changes.figures.map((figure) => (
                <tr key={`${figure.subject}|${figure.figure}`} className="border-b border-line">
                  <td className="py-1 pr-3">{figure.subject}</td>
                  <td className="py-1 pr-3">{figure.figure}</td>
                  <td className="num py-1 pr-3">{value(figure, figure.before)}</td>
                  <td className="num py-1 pr-3">{value(figure, figure.after)}</td>
                  <td className="num py-1 font-semibold">{change(figure)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      ) : null}
    </div>
  );
}
