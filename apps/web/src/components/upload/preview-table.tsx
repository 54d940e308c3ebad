import { keepPreviousData, useQuery } from "@tanstack/react-query";
import type { ColumnMappingInput, ReadOptions } from "@calmcrest/contracts";
import { ApiError } from "../../api/client";
import { uploadKeys } from "../../api/query-keys";
import { previewUpload } from "../../api/uploads";
import { formatArcsec, formatNumber } from "../../lib/format";
import { HEAD_BYTES } from "../../lib/log-head";
import { Notice } from "../page";

/** The first rows of a file as the server reads them with the mapping and read options; nothing is stored. */
export function PreviewTable({ campaignId, file, mapping, readOptions }: { campaignId: number; file: File; mapping: ColumnMappingInput; readOptions: ReadOptions }) {
  const preview = useQuery({
    queryKey: uploadKeys.preview(campaignId, file, mapping, readOptions),
    queryFn: () => previewUpload(campaignId, file.slice(0, HEAD_BYTES), file.name, mapping, readOptions),
    placeholderData: keepPreviousData,
    staleTime: Number.POSITIVE_INFINITY,
  });
  if (preview.isPending) return <p role="status" className="text-sm text-ink-soft">The server is reading the first rows…</p>;
  if (preview.isError)
    return (
      <Notice tone="bad" title="The server could not read the first rows.">
        {preview.error instanceof ApiError ? preview.error.message : "Try again."}
      </Notice>
    );
  const rows = preview.data.rows;
  const bad = rows.filter((row) => row.problem).length;
  return (
    <div className="space-y-2">
      {preview.data.mappingProblems.length > 0 ? (
        <Notice tone="bad" title="The server sees problems with this mapping.">
          <ul>
            {preview.data.mappingProblems.map((problem) => (
              <li key={problem}>{problem}</li>
            ))}
          </ul>
        </Notice>
      ) : null}
      <p className="text-sm" data-testid="preview-summary">
        The server read the first {rows.length} rows: {rows.length - bad} usable, {bad} with a problem. Nothing has been stored yet.
      </p>
      <div className="overflow-x-auto rounded-lg border border-line">
        <table className="w-full border-collapse text-sm">
          <caption className="sr-only">First rows as the server reads them</caption>
          <thead className="bg-paper">
            <tr>
              <th scope="col" className="num px-3 py-2">Line</th>
              <th scope="col" className="px-3 py-2 text-left">Time (UTC)</th>
              <th scope="col" className="num px-3 py-2">Seeing<span className="block text-xs font-normal text-ink-soft">arcsec, zenith, 500 nm</span></th>
              <th scope="col" className="num px-3 py-2">r0<span className="block text-xs font-normal text-ink-soft">cm</span></th>
              <th scope="col" className="num px-3 py-2">Zenith angle<span className="block text-xs font-normal text-ink-soft">deg</span></th>
              <th scope="col" className="num px-3 py-2">Sun altitude<span className="block text-xs font-normal text-ink-soft">deg</span></th>
              <th scope="col" className="px-3 py-2 text-left">Problem</th>
            </tr>
          </thead>
          <tbody>
            {rows.map((row) => (
              <tr key={row.line} className={`border-t border-line ${row.problem ? "bg-bad-pale" : ""}`}>
                <td className="num px-3 py-1.5">{row.line}</td>
                <td className="whitespace-nowrap px-3 py-1.5 tabular-nums">{row.sample ? new Date(row.sample.timeMs).toISOString().slice(0, 19).replace("T", " ") : (row.values[mapping.time_utc ?? ""] ?? "–")}</td>
                <td className="num px-3 py-1.5">{row.sample ? formatArcsec(row.sample.seeingArcsec) : "–"}</td>
                <td className="num px-3 py-1.5">{row.sample ? formatNumber(row.sample.r0Cm, 1) : "–"}</td>
                <td className="num px-3 py-1.5">{row.sample ? formatNumber(row.sample.zenithDeg, 1) : "–"}</td>
                <td className="num px-3 py-1.5">{row.sample ? formatNumber(row.sample.sunAltDeg, 1) : "–"}</td>
                <td className="px-3 py-1.5 text-bad">{row.problem ?? ""}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </div>
  );
}
