import { useId } from "react";
import type { WholeFileCheck } from "@calmcrest/contracts";
import { formatDateTimeUtc, formatNumber } from "../../lib/format";
import { Reason } from "../reason";

export type CheckState = { state: "waiting" } | { state: "checking"; fraction: number } | { state: "done"; result: WholeFileCheck } | { state: "failed"; message: string };

/** What a checked file needs before it may be uploaded: nothing, a confirmation (most rows rejected), or an explicit "store it anyway" (no usable row). */
export function confirmationNeeded(result: WholeFileCheck): "none" | "most_rejected" | "nothing_usable" {
  // The same bytes are stored already: the upload is recognised (and a different mapping offered as a re-read).
  if (result.sameFile) return "none";
  if (result.usable === 0) return "nothing_usable";
  if (result.rejected * 2 > result.rowsRead) return "most_rejected";
  return "none";
}

/** "1 of these will be set aside by the standard zenith limit (60°)": the filters the statistics apply later. */
export function setAsideSentence(result: Pick<WholeFileCheck, "setAsideByStandardFilters">, usableWord = "these"): string | null {
  const { zenith_limit: zenith, sun_above_limit: sun, maxZenithDeg, sunMaxDeg } = result.setAsideByStandardFilters;
  const zenithWords = `by the standard zenith limit (${maxZenithDeg}°)`;
  const sunWords = `by the standard sun limit (sun above ${sunMaxDeg}°)`;
  const why = `in the statistics (the analyzer counts ${zenith + sun === 1 ? "it" : "them"} as rejected; the limits can be changed on the site and campaign pages).`;
  if (zenith > 0 && sun > 0) return `Of ${usableWord}, ${formatNumber(zenith)} will be set aside ${zenithWords} and ${formatNumber(sun)} ${sunWords} ${why}`;
  if (zenith > 0) return `${formatNumber(zenith)} of ${usableWord} will be set aside ${zenithWords} ${why}`;
  if (sun > 0) return `${formatNumber(sun)} of ${usableWord} will be set aside ${sunWords} ${why}`;
  return null;
}

function Bar({ fraction }: { fraction: number }) {
  const percent = Math.round(Math.min(1, Math.max(0, fraction)) * 100);
  return (
    <div className="text-sm">
      <div className="flex justify-between">
        <span>Checking every row on the server</span>
        <span className="tabular-nums">{percent} %</span>
      </div>
      <div role="progressbar" aria-label="Checking every row on the server" aria-valuemin={0} aria-valuemax={100} aria-valuenow={percent} className="mt-1 h-2.5 overflow-hidden rounded-full bg-line">
        <div className="h-full bg-accent transition-[width]" style={{ width: `${percent}%` }} />
      </div>
    </div>
  );
}

/** One file's whole-file check: counts by reason for every row, the first problem lines with their text, and the confirmation it needs. */
export function WholeFileCheckView({ fileName, check, confirmed, onConfirm }: { fileName: string; check: CheckState; confirmed: boolean; onConfirm: (confirmed: boolean) => void }) {
  const confirmId = useId();
  return (
    <li className="space-y-2 rounded-lg border border-line bg-panel p-3" data-testid="whole-file-check">
      <p className="font-semibold">{fileName}</p>
      {check.state === "waiting" ? <p className="text-sm text-ink-soft">Waiting for the files before it.</p> : null}
      {check.state === "checking" ? <Bar fraction={check.fraction} /> : null}
      {check.state === "failed" ? (
        <p role="alert" className="rounded-md bg-bad-pale px-3 py-2 text-sm text-bad">
          {check.message}
        </p>
      ) : null}
      {check.state === "done" ? <CheckResult result={check.result} confirmed={confirmed} onConfirm={onConfirm} confirmId={confirmId} /> : null}
    </li>
  );
}

function CheckResult({ result, confirmed, onConfirm, confirmId }: { result: WholeFileCheck; confirmed: boolean; onConfirm: (confirmed: boolean) => void; confirmId: string }) {
  const reasons = Object.entries(result.rejectedByReason).filter(([, count]) => (count ?? 0) > 0);
  const need = confirmationNeeded(result);
  const setAside = setAsideSentence(result);
  return (
    <div className="space-y-2 text-sm">
      <p data-testid="check-summary">
        All {formatNumber(result.rowsRead)} rows checked: <span className="font-semibold">{formatNumber(result.usable)} usable</span>, <span className="font-semibold">{formatNumber(result.rejected)} with a problem</span>. Nothing has been stored yet.
      </p>
      {result.sameFile ? (
        <p role="status" className="rounded-md bg-warn-pale px-3 py-2 text-warn" data-testid="check-same-file">
          These exact bytes are stored in this campaign already ({result.sameFile.fileName}, uploaded {formatDateTimeUtc(result.sameFile.uploadedAt)}), which is why their times count as duplicates here. Uploading it again is recognised and counts nothing twice; with another mapping, Calmcrest offers to re-read the stored file instead.
        </p>
      ) : null}
      {setAside ? <p className="text-ink-soft" data-testid="check-set-aside">{setAside}</p> : null}
      {result.warnings.map((warning) => (
        <p key={warning.code} role="note" className="rounded bg-warn-pale px-2 py-1 text-warn">
          <span className="font-semibold">Warning:</span> {warning.message}
        </p>
      ))}
      {reasons.length > 0 ? (
        <ul className="space-y-2" aria-label="Problems by reason">
          {reasons.map(([reason, count]) => (
            <li key={reason}>
              <span className="font-semibold">
                {formatNumber(count)} <Reason reason={reason} />
              </span>
              <ul className="mt-1 space-y-1">
                {result.problemLines
                  .filter((line) => line.reason === reason)
                  .map((line) => (
                    <li key={line.line} className="rounded bg-paper px-2 py-1">
                      <span className="text-ink-soft">Line {line.line}: {line.message}</span>
                      <code className="block overflow-x-auto whitespace-pre font-mono text-xs">{line.rawLine === "" ? "(empty line)" : line.rawLine}</code>
                    </li>
                  ))}
              </ul>
            </li>
          ))}
        </ul>
      ) : null}
      {need !== "none" ? (
        <div role="alert" className="space-y-1 rounded-md border border-bad/40 bg-bad-pale px-3 py-2">
          <p className="font-semibold text-bad">
            {need === "nothing_usable"
              ? `No row of this file can be used: it would add 0 samples. Check the mapping (the time column, the units) before storing it.`
              : `Most rows of this file would be rejected: ${formatNumber(result.rejected)} of ${formatNumber(result.rowsRead)} cannot be used. Check the mapping and the problems above first.`}
          </p>
          <label htmlFor={confirmId} className="flex items-center gap-2">
            <input id={confirmId} type="checkbox" checked={confirmed} onChange={(event) => onConfirm(event.target.checked)} />
            {need === "nothing_usable" ? "Store it anyway (the raw file is kept; no sample will count)" : "Upload it anyway: I have looked at the problems"}
          </label>
        </div>
      ) : null}
    </div>
  );
}
