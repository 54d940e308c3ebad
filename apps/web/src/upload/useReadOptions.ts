import { useMemo, useState } from "react";
import type { ReadOptions } from "@calmcrest/contracts";
import { parseUtcOffsetMinutes, type ColumnMapping, type DelimiterChoice, type TimeFormat } from "@calmcrest/seeing-stats";
import { measureOfMapping, type WavelengthField } from "../components/upload/mapping-editor";

/**
 * The upload wizard's read options as the person types them, and the ReadOptions sent with the check, the preview
 * and the upload: the time format and the zone of times written without one, the delimiter ("" detects it), the
 * line of the column names ("" the first that is not a # comment), and the wavelength of a seeing or r0 file (""
 * the campaign monitor's; variances do not depend on it, so it is not sent for them). `problem` is the first value
 * that cannot be used as typed.
 */
export function useReadOptions(mapping: ColumnMapping, campaignWavelengthNm: number | undefined) {
  const [timeFormat, setTimeFormat] = useState<TimeFormat>("iso");
  const [utcOffsetText, setUtcOffsetText] = useState("");
  const offset = useMemo(() => {
    if (utcOffsetText.trim() === "") return { minutes: 0, problem: null };
    try {
      return { minutes: parseUtcOffsetMinutes(utcOffsetText), problem: null };
    } catch (error) {
      return { minutes: 0, problem: error instanceof Error ? `The time zone: ${error.message}.` : "The time zone cannot be read." };
    }
  }, [utcOffsetText]);
  const [delimiterChoice, setDelimiterChoice] = useState<DelimiterChoice | "">("");
  const [headerLineText, setHeaderLineText] = useState("");
  const headerLine = useMemo(() => {
    const text = headerLineText.trim();
    if (text === "") return { line: undefined, problem: null };
    const line = Number(text);
    return /^\d+$/.test(text) && line >= 1 && line <= 10_000
      ? { line, problem: null }
      : { line: undefined, problem: "The line of the column names: write a whole line number from 1 (the first line of the file), or leave it empty." };
  }, [headerLineText]);
  const [wavelengthText, setWavelengthText] = useState("");
  const measure = measureOfMapping(mapping);
  const wavelength = useMemo(() => {
    const text = wavelengthText.trim().replace(",", ".");
    if (text === "" || measure === "variances" || measure === null) return { nm: undefined, problem: null };
    const nm = Number(text);
    return Number.isFinite(nm) && nm >= 300 && nm <= 2500
      ? { nm, problem: null }
      : { nm: undefined, problem: "The wavelength: write it in nanometres between 300 and 2500 (e.g. 550), or leave it empty for the campaign's." };
  }, [wavelengthText, measure]);
  const readOptions: ReadOptions = useMemo(
    () => ({
      timeFormat,
      utcOffsetMinutes: offset.minutes,
      ...(delimiterChoice !== "" ? { delimiter: delimiterChoice } : {}),
      ...(headerLine.line !== undefined ? { headerLine: headerLine.line } : {}),
      ...(wavelength.nm !== undefined && wavelength.nm !== campaignWavelengthNm ? { wavelengthNm: wavelength.nm } : {}),
    }),
    [timeFormat, offset.minutes, delimiterChoice, headerLine.line, wavelength.nm, campaignWavelengthNm],
  );
  const wavelengthField: WavelengthField = useMemo(() => ({ text: wavelengthText, onChange: setWavelengthText, problem: wavelength.problem }), [wavelengthText, wavelength.problem]);
  return {
    readOptions,
    problem: offset.problem ?? headerLine.problem ?? wavelength.problem,
    timeFormat,
    setTimeFormat,
    utcOffsetText,
    setUtcOffsetText,
    offsetProblem: offset.problem,
    delimiterChoice,
    setDelimiterChoice,
    headerLineText,
    setHeaderLineText,
    headerLineProblem: headerLine.problem,
    wavelength: wavelengthField,
  };
}

export type ReadOptionsState = ReturnType<typeof useReadOptions>;
