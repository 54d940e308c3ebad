import { useCallback, useEffect, useMemo, useRef, useState } from "react";
import type { CampaignDetail, ColumnMappingInput, ReadOptions } from "@calmcrest/contracts";
import type { ColumnMapping } from "@calmcrest/seeing-stats";
import { ApiError } from "../api/client";
import { useSaveMapping, useSendUpload } from "../api/mutations";
import { checkWholeFile } from "../api/uploads";
import type { FileSend } from "../components/upload/file-progress";
import { mappingProblems } from "../components/upload/mapping-editor";
import { confirmationNeeded, type CheckState } from "../components/upload/whole-file-check";
import { HEAD_BYTES, readLogHead, unitsOfMapping, type LogHead } from "../lib/log-head";
import { readText } from "../lib/read-text";

export interface UploadBatchInput {
  /** The campaign the batch goes to, once loaded. */
  campaign: CampaignDetail | undefined;
  /** The mapping as the person has it now (one mapping for every file of the batch). */
  mapping: ColumnMapping;
  /** How the files are read beyond the mapping (time format, zone, delimiter, header line). */
  readOptions: ReadOptions;
  /** A read option that cannot be used as typed (it keeps the check and the upload back), or null. */
  readOptionsProblem: string | null;
}

/** The opening text of each chosen file, read once per choice; the heads are read from it with the current options. */
interface ChosenFiles {
  files: File[];
  texts: string[];
  readError: string | null;
}

const NO_FILES: ChosenFiles = { files: [], texts: [], readError: null };

/**
 * The upload wizard's batch: the chosen files and their opening lines, the whole-file check of each (again whenever
 * the mapping, the options or the files change), the person's confirmations, the sending one file at a time with
 * progress and cancel, and the outcome of each. The page holds the form and the layout; this holds the rest.
 */
export function useUploadBatch({ campaign, mapping, readOptions, readOptionsProblem }: UploadBatchInput) {
  const [chosen, setChosen] = useState<ChosenFiles>(NO_FILES);
  const [checks, setChecks] = useState<CheckState[]>([]);
  const [confirmed, setConfirmed] = useState<boolean[]>([]);
  const [sends, setSends] = useState<FileSend[] | null>(null);
  const [failure, setFailure] = useState<string | null>(null);
  const [finishedCount, setFinishedCount] = useState(0);
  // The batch being sent, so Cancel can stop the transfer in progress.
  const transfer = useRef<AbortController | null>(null);
  const saveMapping = useSaveMapping();
  const sendUpload = useSendUpload();
  const { files } = chosen;

  const chooseFiles = useCallback(async (next: File[]) => {
    setSends(null);
    setFinishedCount(0);
    setFailure(null);
    setChecks(next.map(() => ({ state: "waiting" })));
    setConfirmed(next.map(() => false));
    setChosen({ files: next, texts: [], readError: null });
    const first = next[0];
    if (!first) return;
    try {
      const texts = await Promise.all(next.map((file) => readText(file.slice(0, HEAD_BYTES))));
      setChosen({ files: next, texts, readError: null });
    } catch (error) {
      setChosen({ files: next, texts: [], readError: `${first.name}: ${error instanceof Error ? error.message : "the file could not be read."}` });
    }
  }, []);

  /** Takes one file out of the batch before the upload; the others keep their place. */
  const removeFile = useCallback((file: File) => void chooseFiles(files.filter((other) => other !== file)), [chooseFiles, files]);

  // The heads depend on the read options (delimiter, header line), so they are read again when those change.
  const { delimiter, headerLine } = readOptions;
  const layout = useMemo(() => ({ delimiter, headerLine }), [delimiter, headerLine]);
  const { head, headError, headerMismatch } = useMemo((): { head: LogHead | null; headError: string | null; headerMismatch: string[] } => {
    if (chosen.readError) return { head: null, headError: chosen.readError, headerMismatch: [] };
    const firstText = chosen.texts[0];
    const first = chosen.files[0];
    if (firstText === undefined || !first) return { head: null, headError: null, headerMismatch: [] };
    let firstHead: LogHead;
    try {
      firstHead = readLogHead(firstText, undefined, layout);
    } catch (error) {
      return { head: null, headError: `${first.name}: ${error instanceof Error ? error.message : "the file could not be read."}`, headerMismatch: [] };
    }
    // One mapping is used for every file of a batch, so all files must share the first file's columns.
    const key = firstHead.headers.join("\u0000");
    const mismatch = chosen.files.filter((_, index) => {
      if (index === 0) return false;
      try {
        return readLogHead(chosen.texts[index] ?? "", undefined, layout).headers.join("\u0000") !== key;
      } catch {
        return true;
      }
    });
    return { head: firstHead, headError: null, headerMismatch: mismatch.map((file) => file.name) };
  }, [chosen, layout]);
  const headText = chosen.texts[0] ?? "";

  const pixelScaleArcsec = campaign?.monitor.pixelScaleArcsec ?? null;
  const problems = useMemo(() => (head ? mappingProblems(mapping, head.headers, pixelScaleArcsec) : []), [head, mapping, pixelScaleArcsec]);
  const mappingReady = Boolean(campaign && head && problems.length === 0 && headerMismatch.length === 0 && files.length > 0 && readOptionsProblem === null);
  const campaignId = campaign?.id ?? null;

  // The whole-file check: every file read on the server as the upload would read it, again whenever the mapping,
  // the campaign or the files change (after a short pause, so typing through a mapping does not send the file each time).
  const checkKey = mappingReady && sends === null ? JSON.stringify([campaignId, mapping, readOptions, files.map((file) => [file.name, file.size, file.lastModified])]) : null;
  useEffect(() => {
    if (checkKey === null || campaignId === null) return;
    const controller = new AbortController();
    const state: CheckState[] = files.map(() => ({ state: "waiting" }));
    setChecks([...state]);
    setConfirmed(files.map(() => false));
    const timer = setTimeout(async () => {
      for (const [index, file] of files.entries()) {
        state[index] = { state: "checking", fraction: 0 };
        setChecks([...state]);
        try {
          const result = await checkWholeFile(
            campaignId,
            file,
            mapping,
            (fraction) => {
              state[index] = { state: "checking", fraction };
              setChecks([...state]);
            },
            controller.signal,
            readOptions,
          );
          state[index] = { state: "done", result };
        } catch (error) {
          if (controller.signal.aborted) return;
          state[index] = { state: "failed", message: error instanceof ApiError ? error.message : "The check failed. Try again." };
        }
        setChecks([...state]);
      }
    }, 300);
    return () => {
      clearTimeout(timer);
      controller.abort();
    };
    // checkKey stands for campaignId, mapping, the read options and files.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [checkKey]);

  const confirm = useCallback((index: number, value: boolean) => setConfirmed((previous) => previous.map((old, at) => (at === index ? value : old))), []);
  const checksDone = checks.length === files.length && checks.every((check) => check.state === "done");
  const unconfirmed = checks.filter((check, index) => check.state === "done" && confirmationNeeded(check.result) !== "none" && !confirmed[index]).length;
  const ready = mappingReady && checksDone && unconfirmed === 0;
  const running = sends !== null && sends.some((send) => send.state === "sending" || send.state === "waiting");

  /** Sends every file of the batch, one at a time (the server ingests one at a time anyway, and the bar stays meaningful). */
  const send = async ({ mapping: chosenMapping, keepMapping }: { mapping: ColumnMappingInput; keepMapping: boolean }) => {
    const target = campaign;
    if (!target || !ready) return;
    setFailure(null);
    setFinishedCount(0);
    if (keepMapping) {
      try {
        await saveMapping.mutateAsync({ campaignId: target.id, input: { mapping: chosenMapping, units: { ...unitsOfMapping(chosenMapping as ColumnMapping) } } });
      } catch (error) {
        setFailure(`The mapping could not be saved for next time (${error instanceof ApiError ? error.message : "try again"}); the upload goes on.`);
      }
    }
    const state: FileSend[] = files.map(() => ({ state: "waiting" }));
    setSends([...state]);
    const controller = new AbortController();
    transfer.current = controller;
    for (const [index, file] of files.entries()) {
      state[index] = { state: "sending", fraction: 0 };
      setSends([...state]);
      let sentFraction = 0;
      try {
        const outcome = await sendUpload.mutateAsync({
          campaignId: target.id,
          file,
          mapping: chosenMapping,
          onProgress: (fraction) => {
            sentFraction = fraction;
            state[index] = { state: "sending", fraction };
            setSends([...state]);
          },
          signal: controller.signal,
          readOptions,
          // The person ticked "store it anyway" for a file whose check found no usable row.
          storeAnyway: confirmedNothingUsable(index),
        });
        state[index] =
          outcome.kind === "accepted"
            ? { state: "stored", uploadId: outcome.accepted.upload.id, storedAnyway: outcome.accepted.storedAnyway ?? null }
            : { state: "duplicate", message: outcome.duplicate.error.message, upload: outcome.duplicate.upload, rereadOffer: outcome.duplicate.rereadOffer };
      } catch (error) {
        if (controller.signal.aborted) {
          // Once every byte is out, the server may already have stored the file before the cancel reached it.
          state[index] = { state: "cancelled", sentInFull: sentFraction >= 1 };
          for (let later = index + 1; later < files.length; later += 1) state[later] = { state: "not-sent" };
          setSends([...state]);
          break;
        }
        state[index] = { state: "refused", message: error instanceof ApiError ? error.message : "The upload failed. Try again." };
      }
      setSends([...state]);
    }
    transfer.current = null;
  };

  /** True when file `index`'s check found nothing usable and the person confirmed keeping it. */
  function confirmedNothingUsable(index: number): boolean {
    const check = checks[index];
    return check?.state === "done" && confirmationNeeded(check.result) === "nothing_usable" && confirmed[index] === true;
  }

  const cancel = useCallback(() => transfer.current?.abort(), []);
  const onFinished = useCallback(() => setFinishedCount((count) => count + 1), []);

  /** Says what is still missing before the upload, in the order a person meets it. */
  const notReadyText = () => {
    if (!campaign) return "Choose the campaign first.";
    if (files.length === 0) return "Choose the log files.";
    if (headerMismatch.length > 0) return "Upload files with other columns separately (see above).";
    if (problems.length > 0) return "Fix the mapping problems listed above.";
    if (readOptionsProblem !== null) return "Correct how the file is read (see above).";
    if (!checksDone) return checks.some((check) => check.state === "failed") ? "The check found a file that cannot be read (see above)." : "Waiting for the check of every row.";
    if (unconfirmed > 0) return "Confirm the files with mostly rejected rows above, or correct the mapping.";
    return "";
  };

  /** The check of file `index`, once it has an answer. */
  const checkResult = (index: number) => {
    const check = checks[index];
    return check?.state === "done" ? check.result : undefined;
  };

  return {
    files,
    head,
    headText,
    headError,
    headerMismatch,
    problems,
    checks,
    confirmed,
    confirm,
    checksDone,
    ready,
    running,
    sends,
    failure,
    finishedCount,
    chooseFiles,
    removeFile,
    send,
    cancel,
    onFinished,
    notReadyText,
    checkResult,
  };
}
