import { parseUtcTime } from './parseUtcTime.js';

/**
 * How a log writes its times: ISO 8601 (the native form), Julian date, modified Julian date, or a day-first /
 * month-first civil date ('31/12/2025 23:15[:30]', '12/31/2025 23:15', with '/', '.' or '-' between the parts).
 */
export const TIME_FORMATS = ['iso', 'jd', 'mjd', 'dmy', 'mdy'] as const;

export type TimeFormat = (typeof TIME_FORMATS)[number];

/** Julian date of the Unix epoch 1970-01-01T00:00Z (standard value, e.g. the Astronomical Almanac's JD tables). */
const UNIX_EPOCH_JD = 2440587.5;
/** MJD = JD − 2400000.5 (definition of the modified Julian date, IAU 1973). */
const MJD_OFFSET_DAYS = 2400000.5;
const DAY_MS = 86_400_000;

const DECIMAL = /^[+-]?(\d+\.?\d*|\.\d+)$/;
const CIVIL = /^(\d{1,2})[/.-](\d{1,2})[/.-](\d{4})(?:[ T,]+(\d{1,2}):(\d{2})(?::(\d{2}(?:[.,]\d+)?))?)?\s*(Z|[+-]\d{2}:?\d{2})?$/i;
const HAS_ZONE = /(Z|[+-]\d{2}:?\d{2})$/i;

const pad = (value: string) => value.padStart(2, '0');

/**
 * UTC epoch ms of a log's time text in the given format; NaN when the text is not such a time (or names an
 * impossible date). `utcOffsetMinutes` is the zone of times that carry none (a file logged in local time, e.g.
 * +120 for UTC+02:00): it is subtracted from them; a time with its own 'Z' or offset keeps it. Julian and modified
 * Julian dates are UTC by definition and ignore it.
 * Example: parseTimeAs('2451545.0', 'jd') → Date.UTC(2000, 0, 1, 12) (J2000.0).
 */
export function parseTimeAs(raw: string, format: TimeFormat, utcOffsetMinutes = 0): number {
  const text = raw.trim();
  if (format === 'jd' || format === 'mjd') {
    if (!DECIMAL.test(text)) return Number.NaN;
    const days = Number(text) + (format === 'mjd' ? MJD_OFFSET_DAYS : 0);
    return Number.isFinite(days) ? Math.round((days - UNIX_EPOCH_JD) * DAY_MS) : Number.NaN;
  }
  let iso = text;
  if (format === 'dmy' || format === 'mdy') {
    const match = CIVIL.exec(text);
    if (!match) return Number.NaN;
    const [, first = '', second = '', year = '', hour = '0', minute = '00', second60, zone] = match;
    const [day, month] = format === 'dmy' ? [first, second] : [second, first];
    iso = `${year}-${pad(month)}-${pad(day)}T${pad(hour)}:${minute}${second60 === undefined ? '' : `:${second60.replace(',', '.').padStart(2, '0')}`}${zone ?? ''}`;
  }
  const timeMs = parseUtcTime(iso);
  if (Number.isNaN(timeMs) || utcOffsetMinutes === 0 || HAS_ZONE.test(iso)) return timeMs;
  return timeMs - utcOffsetMinutes * 60_000;
}

/** What a time in this format looks like, for messages. */
export function timeFormatExample(format: TimeFormat): string {
  switch (format) {
    case 'iso':
      return 'an ISO 8601 UTC time like 2025-03-01T23:15:00Z';
    case 'jd':
      return 'a Julian date like 2460736.46875';
    case 'mjd':
      return 'a modified Julian date like 60735.96875';
    case 'dmy':
      return 'a day-first date and time like 01/03/2025 23:15:00';
    case 'mdy':
      return 'a month-first date and time like 03/01/2025 23:15:00';
  }
}

/**
 * Minutes east of UTC of an offset written '+02:00', '-0330', '+2' or 'UTC+02:00' (a whole file's zone); throws
 * a RangeError naming the text otherwise.
 */
export function parseUtcOffsetMinutes(text: string): number {
  const match = /^(?:UTC)?\s*([+-])(\d{1,2})(?::?(\d{2}))?$/i.exec(text.trim());
  const hours = Number(match?.[2]);
  const minutes = Number(match?.[3] ?? '0');
  if (!match || hours > 14 || minutes > 59) throw new RangeError(`the UTC offset must be written like +02:00 or -03:30, got "${text}"`);
  return (match[1] === '-' ? -1 : 1) * (hours * 60 + minutes);
}
