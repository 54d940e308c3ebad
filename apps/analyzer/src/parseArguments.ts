import { isLogField, parseDelimiterChoice, parseUtcOffsetMinutes, RESPONSE_SETS, TIME_FORMATS, type DelimiterChoice, type MappingOverrides, type ResponseSet, type TimeFormat } from '@calmcrest/seeing-stats';
import type { AnalyzeOptions } from '@calmcrest/seeing-stats/node';

export class UsageError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'UsageError';
  }
}

export interface AnalyzerArguments {
  file: string | null;
  json: boolean;
  help: boolean;
  options: AnalyzeOptions;
  /** Set when a planned telescope's FWHM is asked for (--telescope-wavelength-nm or --outer-scale-m). */
  telescope: { outerScaleM?: number; wavelengthNm: number; telescopeDiameterM?: number } | null;
}

export const USAGE = `Usage: npm run --silent analyze -- <file> [flags]

Checks a seeing-monitor log and prints seeing statistics at zenith and 500 nm.

Monitor
  --aperture-mm D            sub-aperture diameter (needed for variance columns)
  --baseline-mm B            distance between sub-aperture centres (needed for variance columns)
  --wavelength-nm L          wavelength the monitor measured at (default 500; give it for seeing or r0 logs,
                             else the output carries a warning)
  --pixel-scale-arcsec P     plate scale, for variances logged in pixel²
  --exposure-ms T            exposure time per frame (recorded in the output)
  --response SET             z-tilt (default) | g-tilt | sarazin-roddier
Columns
  --map field=Header         the file's column "Header" holds field (repeatable; other fields still match by name), e.g. --map zenith_deg=ZD; field= reads no column for field
  --time-format F            how the time column is written: iso (default) | jd (Julian date) | mjd | dmy (31/12/2025 23:15) | mdy (12/31/2025 23:15)
  --utc-offset ±HH:MM        the zone of times written without one (a log kept in local time), e.g. --utc-offset -04:00
  --date-column Name --time-column Name   the date and the time of day are in two columns, e.g. --date-column Date --time-column Time
  --delimiter D              , | ';' | tab | space | whitespace (runs of spaces or tabs); detected when not given
  --header-line N            the column names are on line N (counted from 1); the lines above are a preamble, skipped
Filters
  --site-lat DEG --site-lon DEG   site position (east positive); turns on the night filter and names nights
                             and seasons by the site (without it nights split at 12:00 UTC: a warning)
  --site-elevation-m M       site elevation (optional)
  --sun-max-deg DEG          drop samples with the sun above this altitude (default -18)
  --max-zenith-deg DEG       drop samples farther than this from the zenith (default 60)
  --min-flux F               drop samples with a flux below F
  --keep-anisotropic         keep samples whose two axes disagree beyond the set ratio (left out by default)
Plausibility (rows outside are rejected as implausible_seeing / implausible_time)
  --min-plausible-seeing-arcsec S  lowest plausible seeing at zenith, 500 nm (default 0.05)
  --max-plausible-seeing-arcsec S  highest plausible seeing at zenith, 500 nm (default 10)
Statistics
  --thresholds A,B,C         seeing thresholds for the "fraction below" lines (default 0.6,0.8,1.0)
  --replicates N             night-bootstrap replicates (default 1000)
  --seed N                   bootstrap seed (default 1)
Planned telescope (optional)
  --telescope-wavelength-nm L  predict its long-exposure FWHM at this wavelength (default 500 when --outer-scale-m is given)
  --outer-scale-m L0           von Kármán outer scale (default 25)
  --telescope-diameter-m D     apply the diameter-dependent (Kolb) factor
Output
  --json                     print exactly one JSON document on stdout
  --help                     this text

Exit codes: 0 analysed; 1 analysed but no sample was accepted; 2 the file or the flags cannot be used;
3 analysed with warnings (lines that could not be split, or over 10 % of rows unusable; see "warnings").`;

const NUMBER_FLAGS = new Set([
  '--aperture-mm',
  '--baseline-mm',
  '--wavelength-nm',
  '--pixel-scale-arcsec',
  '--exposure-ms',
  '--site-lat',
  '--site-lon',
  '--site-elevation-m',
  '--sun-max-deg',
  '--max-zenith-deg',
  '--min-flux',
  '--min-plausible-seeing-arcsec',
  '--max-plausible-seeing-arcsec',
  '--replicates',
  '--seed',
  '--telescope-wavelength-nm',
  '--outer-scale-m',
  '--telescope-diameter-m',
]);

function readNumberFlag(flag: string, text: string | undefined): number {
  if (text === undefined || text.trim() === '') throw new UsageError(`${flag} needs a number after it.`);
  const value = Number(text);
  if (!Number.isFinite(value)) throw new UsageError(`${flag} needs a number, got "${text}".`);
  return value;
}

/** Parses the analyzer's command line; throws UsageError with a message a person can act on. */
export function parseArguments(argv: readonly string[]): AnalyzerArguments {
  const numbers = new Map<string, number>();
  const mapping: MappingOverrides = {};
  let file: string | null = null;
  let json = false;
  let help = false;
  let response: ResponseSet = 'z-tilt';
  let thresholdsArcsec: number[] | undefined;
  let keepAnisotropic = false;
  let timeFormat: TimeFormat | undefined;
  let utcOffsetMinutes: number | undefined;
  let delimiter: DelimiterChoice | undefined;
  let headerLine: number | undefined;
  let dateColumn: string | undefined;
  let timeColumn: string | undefined;
  for (let index = 0; index < argv.length; index += 1) {
    const argument = argv[index] ?? '';
    const equals = argument.startsWith('--') ? argument.indexOf('=') : -1;
    // Accept both "--flag value" and "--flag=value".
    const flag = equals > 0 ? argument.slice(0, equals) : argument;
    const inlineValue = equals > 0 ? argument.slice(equals + 1) : undefined;
    const takeValue = (): string | undefined => {
      if (inlineValue !== undefined) return inlineValue;
      index += 1;
      return argv[index];
    };
    if (flag === '--json') json = true;
    else if (flag === '--keep-anisotropic') keepAnisotropic = true;
    else if (flag === '--help' || flag === '-h') help = true;
    else if (NUMBER_FLAGS.has(flag)) numbers.set(flag, readNumberFlag(flag, takeValue()));
    else if (flag === '--response') {
      const value = takeValue() ?? '';
      if (!(RESPONSE_SETS as readonly string[]).includes(value)) throw new UsageError(`--response must be one of ${RESPONSE_SETS.join(', ')}, got "${value}".`);
      response = value as ResponseSet;
    } else if (flag === '--map') {
      const value = takeValue() ?? '';
      const split = value.indexOf('=');
      const field = split > 0 ? value.slice(0, split).trim() : '';
      const header = split > 0 ? value.slice(split + 1) : '';
      if (!isLogField(field)) {
        throw new UsageError(`--map needs field=Header with a Calmcrest field name (time_utc, seeing_arcsec, airmass, …; see the README, "Log format"), got "${value}".`);
      }
      // field= (nothing after the '=') says the file has no such column: the field is not matched by name either.
      mapping[field] = header === '' ? null : header;
    } else if (flag === '--time-format') {
      const value = takeValue() ?? '';
      if (!(TIME_FORMATS as readonly string[]).includes(value)) throw new UsageError(`--time-format must be one of ${TIME_FORMATS.join(', ')}, got "${value}".`);
      timeFormat = value as TimeFormat;
    } else if (flag === '--utc-offset') {
      const value = takeValue() ?? '';
      try {
        utcOffsetMinutes = parseUtcOffsetMinutes(value);
      } catch (error) {
        throw new UsageError(`--utc-offset: ${error instanceof Error ? error.message : String(error)}.`);
      }
    } else if (flag === '--date-column' || flag === '--time-column') {
      const value = takeValue() ?? '';
      if (value.trim() === '') throw new UsageError(`${flag} needs the name of a column as written in the header line, e.g. ${flag} ${flag === '--date-column' ? 'Date' : 'Time'}.`);
      if (flag === '--date-column') dateColumn = value;
      else timeColumn = value;
    } else if (flag === '--delimiter') {
      const value = takeValue() ?? '';
      try {
        delimiter = parseDelimiterChoice(value);
      } catch (error) {
        throw new UsageError(`--delimiter: ${error instanceof Error ? error.message : String(error)}. Quote ';' for the shell: --delimiter ';'.`);
      }
    } else if (flag === '--header-line') {
      const value = takeValue() ?? '';
      const line = Number(value);
      if (!/^\d+$/.test(value.trim()) || !(Number.isInteger(line) && line >= 1)) {
        throw new UsageError(`--header-line needs the number of the line holding the column names, a whole number from 1 (the first line of the file), got "${value}".`);
      }
      headerLine = line;
    } else if (flag === '--thresholds') {
      const value = takeValue() ?? '';
      const parsed = value.split(',').map((part) => Number(part));
      if (parsed.length === 0 || parsed.some((threshold) => !(threshold > 0 && Number.isFinite(threshold)))) {
        throw new UsageError(`--thresholds needs positive seeing values in arcsec separated by commas, e.g. 0.6,0.8,1.0; got "${value}".`);
      }
      thresholdsArcsec = parsed;
    } else if (argument.startsWith('-')) {
      throw new UsageError(`Unknown flag ${argument}. Run with --help for the list of flags.`);
    } else if (file === null) {
      file = argument;
    } else {
      throw new UsageError(`Only one log file can be analysed at a time; got "${file}" and "${argument}".`);
    }
  }

  const latitude = numbers.get('--site-lat');
  const longitude = numbers.get('--site-lon');
  if ((latitude === undefined) !== (longitude === undefined)) throw new UsageError('Give both --site-lat and --site-lon (degrees, east positive), or neither.');
  if (latitude !== undefined && !(latitude >= -90 && latitude <= 90)) throw new UsageError(`--site-lat must be in [-90, 90] degrees, got ${latitude}.`);
  if (longitude !== undefined && !(longitude >= -180 && longitude <= 360)) throw new UsageError(`--site-lon must be in [-180, 360] degrees east, got ${longitude}.`);
  const replicates = numbers.get('--replicates');
  if (replicates !== undefined && !(Number.isInteger(replicates) && replicates >= 1)) throw new UsageError(`--replicates must be a whole number ≥ 1, got ${replicates}.`);

  if (dateColumn !== undefined && timeColumn === undefined) {
    throw new UsageError(`--date-column ${dateColumn} needs --time-column with the column holding the time of day (the two are read together as "date time").`);
  }
  if (dateColumn !== undefined) mapping.date_utc = dateColumn;
  if (timeColumn !== undefined) mapping.time_utc = timeColumn;

  const options: AnalyzeOptions = {
    mapping: Object.keys(mapping).length > 0 ? mapping : undefined,
    ...(delimiter !== undefined ? { delimiter } : {}),
    ...(headerLine !== undefined ? { headerLine } : {}),
    ...(timeFormat ? { timeFormat } : {}),
    ...(utcOffsetMinutes ? { utcOffsetMinutes } : {}),
    monitor: {
      wavelengthNm: numbers.get('--wavelength-nm') ?? 500,
      response,
      ...(numbers.has('--aperture-mm') ? { apertureMm: numbers.get('--aperture-mm') } : {}),
      ...(numbers.has('--baseline-mm') ? { baselineMm: numbers.get('--baseline-mm') } : {}),
      ...(numbers.has('--pixel-scale-arcsec') ? { pixelScaleArcsec: numbers.get('--pixel-scale-arcsec') } : {}),
      ...(numbers.has('--exposure-ms') ? { exposureMs: numbers.get('--exposure-ms') } : {}),
    },
    site:
      latitude !== undefined && longitude !== undefined
        ? { latitudeDeg: latitude, longitudeDeg: longitude, ...(numbers.has('--site-elevation-m') ? { elevationM: numbers.get('--site-elevation-m') } : {}) }
        : undefined,
    filters: {
      ...(numbers.has('--sun-max-deg') ? { sunMaxDeg: numbers.get('--sun-max-deg') } : {}),
      ...(numbers.has('--max-zenith-deg') ? { maxZenithDeg: numbers.get('--max-zenith-deg') } : {}),
      ...(numbers.has('--min-flux') ? { minFlux: numbers.get('--min-flux') } : {}),
      ...(keepAnisotropic ? { leaveOutAnisotropic: false } : {}),
    },
    wavelengthGiven: numbers.has('--wavelength-nm'),
    plausibility: {
      ...(numbers.has('--min-plausible-seeing-arcsec') ? { minSeeingArcsec: numbers.get('--min-plausible-seeing-arcsec') } : {}),
      ...(numbers.has('--max-plausible-seeing-arcsec') ? { maxSeeingArcsec: numbers.get('--max-plausible-seeing-arcsec') } : {}),
    },
    summary: {
      ...(thresholdsArcsec !== undefined ? { thresholdsArcsec } : {}),
      ...(replicates !== undefined ? { bootstrapReplicates: replicates } : {}),
      ...(numbers.has('--seed') ? { seed: numbers.get('--seed') } : {}),
    },
  };
  const telescopeWavelength = numbers.get('--telescope-wavelength-nm');
  const outerScale = numbers.get('--outer-scale-m');
  const telescopeDiameter = numbers.get('--telescope-diameter-m');
  const telescope =
    telescopeWavelength !== undefined || outerScale !== undefined || telescopeDiameter !== undefined
      ? {
          wavelengthNm: telescopeWavelength ?? 500,
          ...(outerScale !== undefined ? { outerScaleM: outerScale } : {}),
          ...(telescopeDiameter !== undefined ? { telescopeDiameterM: telescopeDiameter } : {}),
        }
      : null;
  return { file, json, help, options, telescope };
}
