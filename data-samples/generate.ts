// Regenerates the sample logs in this folder (invented data; see README.md for what each holds and its counts).
// Run from the repository root: node_modules/.bin/tsx data-samples/generate.ts
import { readFileSync, writeFileSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, dirname } from 'node:path';
import { fileURLToPath } from 'node:url';
import { writeSyntheticLog } from '../packages/seeing-stats/src/node/index.js'; // root scripts have no package of their own
import { createRandom } from '../packages/seeing-stats/src/index.js';

const here = dirname(fileURLToPath(import.meta.url));
const scratch = mkdtempSync(join(tmpdir(), 'calmcrest-samples-'));
// An invented ridge in a desert; not any real observatory's position.
const site = { latitudeDeg: -27.42, longitudeDeg: -70.15, elevationM: 2650 };

async function syntheticLines(options: { seed: number; nights: number; cadenceSeconds: number; pixelScaleArcsec?: number; apertureMm: number; baselineMm: number; wavelengthNm: number; startDate: string }): Promise<string[]> {
  const path = join(scratch, `s${options.seed}.csv`);
  await writeSyntheticLog(path, {
    seed: options.seed,
    site,
    startDate: options.startDate,
    nights: options.nights,
    medianSeeingArcsec: 0.78,
    cadenceSeconds: options.cadenceSeconds,
    weatherLossFraction: 0,
    monitor: { apertureMm: options.apertureMm, baselineMm: options.baselineMm, wavelengthNm: options.wavelengthNm, pixelScaleArcsec: options.pixelScaleArcsec, response: 'z-tilt' },
  });
  return readFileSync(path, 'utf8').trimEnd().split('\n');
}

// 1. Native format, variances in arcsec², with one row of each kind of damage.
{
  const lines = await syntheticLines({ seed: 11, nights: 3, cadenceSeconds: 180, apertureMm: 60, baselineMm: 200, wavelengthNm: 500, startDate: '2025-04-07' });
  const header = lines.findIndex((line) => line.startsWith('time_utc'));
  const body = lines.slice(header + 1);
  const at = (index: number): string[] => (body[index] ?? '').split(',');
  const damaged: string[] = [];
  const row = (fields: (string | undefined)[]): string => fields.map((field) => field ?? '').join(',');
  const base = at(20);
  // Distinct seconds keep the damaged rows from repeating a real row's time (only the duplicate row should).
  const withSeconds = (time: string | undefined, seconds: string): string => (time ?? '').replace(/:\d\dZ$/, `:${seconds}Z`);
  damaged.push(row([withSeconds(base[0], '07'), '', base[2], base[3], base[4]])); // missing_value
  damaged.push(row(['2025-13-01T00:00:00Z', base[1], base[2], base[3], base[4]])); // unreadable_time (month 13)
  damaged.push(row(['yesterday evening', base[1], base[2], base[3], base[4]])); // unreadable_time
  damaged.push(row([withSeconds(base[0], '08'), base[1], '-0.0100', base[3], base[4]])); // non_physical
  damaged.push(row([withSeconds(base[0], '09'), 'NaN', base[2], base[3], base[4]])); // non_physical
  damaged.push(row([withSeconds(base[0], '10'), base[1], base[2], '95.00', base[4]])); // non_physical
  damaged.push(row([withSeconds(base[0], '11'), base[1], base[2], '72.50', base[4]])); // zenith_limit
  damaged.push(row([base[0], base[1], base[2], base[3], base[4]])); // duplicate_time (same time as body row 20)
  damaged.push(row(['2025-04-08T18:00:00Z', base[1], base[2], base[3], base[4]])); // sun_above_limit (local early afternoon)
  damaged.push(row([withSeconds(base[0], '12'), base[1], base[2], base[3], '120'])); // low_flux with --min-flux 1000
  const out = [...lines.slice(0, header + 1), ...body.slice(0, 40), ...damaged, ...body.slice(40)];
  writeFileSync(join(here, 'native-arcsec2.csv'), `${out.join('\n')}\n`);
  console.log('native-arcsec2.csv', body.length, 'clean rows +', damaged.length, 'damaged');
}

// 2. Native names, variances in pixel², tab-separated with CRLF line ends, measured at 550 nm.
{
  const lines = await syntheticLines({ seed: 12, nights: 2, cadenceSeconds: 240, apertureMm: 50, baselineMm: 180, wavelengthNm: 550, pixelScaleArcsec: 0.65, startDate: '2025-06-20' });
  const out = lines.map((line) => (line.startsWith('#') ? line : line.replaceAll(',', '\t')));
  writeFileSync(join(here, 'native-px2.tsv'), `${out.join('\r\n')}\r\n`);
  console.log('native-px2.tsv', out.filter((line) => !line.startsWith('#')).length - 1, 'rows');
}

// 3. A monitor's own export: semicolons, its own headers, seeing FWHM and airmass, space-separated times without Z.
{
  const random = createRandom(13);
  const rows: string[] = ['Timestamp (UTC);FWHM [arcsec];Airmass;Wind [m/s]'];
  const start = Date.parse('2025-05-02T00:30:00Z');
  for (let index = 0; index < 400; index += 1) {
    const time = new Date(start + index * 120_000 + Math.floor(index / 200) * 86_400_000).toISOString().slice(0, 19).replace('T', ' ');
    const airmass = 1.05 + 0.5 * random();
    const fwhm = 0.8 * Math.exp(0.3 * (random() + random() - 1)) * airmass ** 0.6;
    rows.push(`${time};${fwhm.toFixed(3)};${airmass.toFixed(3)};${(3 + 6 * random()).toFixed(1)}`);
  }
  // Damage: airmass below 1, an empty FWHM, a low star (airmass 2.5 = 66.4° from zenith).
  rows[51] = (rows[51] ?? '').replace(/;[0-9.]+;([0-9.]+)$/, ';0.800;$1').replace(/^([^;]+;[^;]+;)[0-9.]+/, '$10.800');
  rows[102] = (rows[102] ?? '').replace(/^([^;]+;)[0-9.]+/, '$1');
  rows[153] = (rows[153] ?? '').replace(/^([^;]+;[^;]+;)[0-9.]+/, '$12.500');
  writeFileSync(join(here, 'wizard-fwhm-airmass.csv'), `${rows.join('\n')}\n`);
  console.log('wizard-fwhm-airmass.csv', rows.length - 1, 'rows');
}

// 4. Native names, r0 in cm and zenith angle, with comments and a blank line inside.
{
  const random = createRandom(14);
  const rows: string[] = ['# Fried parameter log, invented data', 'time_utc,r0_cm,zenith_deg,tau0_ms,theta0_arcsec,rh_pct'];
  const start = Date.parse('2025-08-11T02:00:00Z');
  for (let index = 0; index < 300; index += 1) {
    if (index === 150) rows.push('# monitor restarted', '');
    const time = new Date(start + index * 60_000).toISOString().slice(0, 19) + 'Z';
    const r0Cm = 12.5 * Math.exp(0.25 * (random() + random() - 1));
    rows.push(`${time},${r0Cm.toFixed(2)},${(15 + 20 * random()).toFixed(1)},${(3 + 4 * random()).toFixed(2)},${(1.6 + random()).toFixed(2)},${(10 + 30 * random()).toFixed(0)}`);
  }
  rows[60] = (rows[60] ?? '').replace(/^([^,]+,)[0-9.]+/, '$10.00'); // non_physical: r0 = 0
  writeFileSync(join(here, 'r0-cm.csv'), `${rows.join('\n')}\n`);
  console.log('r0-cm.csv 300 rows');
}

// 5. Native format with interlaced exposures: variances at τ = 5 ms and at 2τ = 10 ms, in arcsec².
{
  const lines = await syntheticLines({ seed: 16, nights: 1, cadenceSeconds: 120, apertureMm: 60, baselineMm: 200, wavelengthNm: 500, startDate: '2025-09-14' });
  const header = lines.findIndex((line) => line.startsWith('time_utc'));
  const random = createRandom(16);
  // The synthetic variances stand for the 5 ms exposure. The 10 ms one follows ln ε(τ) = ln ε0 + c τ^p with
  // p = log2(7/3), the law the 1.75/−0.75 rule inverts exactly: ε(2τ)/ε(τ) = exp((2^p − 1) c τ^p) = exp(4/3 · c τ^p),
  // and variances scale as ε^(5/3). c τ^p is drawn per row between −0.06 and −0.01 (a few per cent of smoothing).
  const doubleVariance = (variance: number, shrink: number): string => (variance * Math.exp(((4 / 3) * shrink * 5) / 3)).toPrecision(6);
  // Rows (counted from the first data row) whose pair is noise-dominated: the 10 ms variance above the 5 ms one.
  const noisyAxes = new Map<number, 'long' | 'trans' | 'both'>([
    [25, 'trans'],
    [80, 'long'],
    [140, 'both'],
    [200, 'trans'],
  ]);
  const body = lines.slice(header + 1).map((line, index) => {
    const [time, long, trans, zenith, flux] = line.split(',');
    const shrinkLong = -0.01 - 0.05 * random();
    const shrinkTrans = -0.01 - 0.05 * random();
    const noisy = noisyAxes.get(index);
    const long2x = noisy === 'long' || noisy === 'both' ? (Number(long) * 1.12).toPrecision(6) : doubleVariance(Number(long), shrinkLong);
    const trans2x = noisy === 'trans' || noisy === 'both' ? (Number(trans) * 1.09).toPrecision(6) : doubleVariance(Number(trans), shrinkTrans);
    return [time, long, trans, long2x, trans2x, zenith, flux].join(',');
  });
  // Damaged 2τ cells: an empty one (missing_value) and a zero (non_physical).
  body[60] = (body[60] ?? '').replace(/^([^,]*,[^,]*,[^,]*,[^,]*,)[^,]*/, '$1');
  body[120] = (body[120] ?? '').replace(/^([^,]*,[^,]*,[^,]*,)[^,]*/, '$10');
  const comments = [...lines.slice(0, header), '# interlaced exposures: 5 ms and 10 ms frames alternate; the _2x_ columns are the 10 ms variances'];
  const out = [...comments, 'time_utc,var_long_arcsec2,var_trans_arcsec2,var_long_2x_arcsec2,var_trans_2x_arcsec2,zenith_deg,flux', ...body];
  writeFileSync(join(here, 'native-interlaced.csv'), `${out.join('\n')}\n`);
  console.log('native-interlaced.csv', body.length, 'rows,', noisyAxes.size, 'noise-dominated, 2 damaged 2x cells, header on line', comments.length + 1);
}

// 6. Files that cannot be read at all.
{
  const random = createRandom(15);
  const bytes = new Uint8Array(2048);
  for (let index = 0; index < bytes.length; index += 1) bytes[index] = Math.floor(random() * 256);
  bytes[0] = 0x89; // looks like the start of an image file
  bytes[7] = 0;
  writeFileSync(join(here, 'malformed-binary.bin'), bytes);
  writeFileSync(join(here, 'malformed-no-time.csv'), 'seeing_arcsec,zenith_deg\n0.71,20.5\n0.83,21.0\n');
  writeFileSync(join(here, 'malformed-empty.csv'), '');
}
// 7. Times as monitors also write them: Julian dates, and day-first local times in a file kept at UTC+02:00.
{
  const random = createRandom(16);
  const start = Date.parse('2025-06-10T23:00:00Z');
  const seeing = () => (0.75 * Math.exp(0.3 * (random() + random() - 1))).toFixed(3);
  const zenith = () => (10 + 30 * random()).toFixed(1);
  const jdRows: string[] = ['# Julian dates (UTC), invented data', 'jd,seeing_arcsec,zenith_deg'];
  for (let index = 0; index < 120; index += 1) jdRows.push(`${((start + index * 120_000) / 86_400_000 + 2440587.5).toFixed(8)},${seeing()},${zenith()}`);
  jdRows[41] = (jdRows[41] ?? '').replace(/^[^,]+/, '2025-06-11T00:18:00Z'); // line 42: an ISO time in a Julian-date column
  writeFileSync(join(here, 'time-jd.csv'), `${jdRows.join('\n')}\n`);
  const two = (value: number) => String(value).padStart(2, '0');
  const localRows: string[] = ['Date/time (local);Seeing;Zenith'];
  for (let index = 0; index < 100; index += 1) {
    const local = new Date(start + 2 * 3_600_000 + index * 120_000);
    const text = `${two(local.getUTCDate())}/${two(local.getUTCMonth() + 1)}/${local.getUTCFullYear()} ${two(local.getUTCHours())}:${two(local.getUTCMinutes())}:00`;
    localRows.push(`${text};${seeing().replace('.', ',')};${zenith().replace('.', ',')}`);
  }
  localRows[30] = (localRows[30] ?? '').replace(/^\d\d\/06/, '31/06'); // line 31: 31 June does not exist
  writeFileSync(join(here, 'time-dmy-local.csv'), `${localRows.join('\n')}\n`);
  console.log('time-jd.csv 120 rows, time-dmy-local.csv 100 rows');
}
// 8. Layouts monitors also write: date and time of day in two columns, columns aligned with runs of blanks, a
// delimiter the detection gets wrong, and a plain-text preamble above the column names.
{
  const random = createRandom(17);
  const start = Date.parse('2025-06-12T23:00:00Z');
  const seeing = () => (0.78 * Math.exp(0.3 * (random() + random() - 1))).toFixed(3);
  const zenith = () => (12 + 28 * random()).toFixed(1);
  const iso = (index: number) => new Date(start + index * 120_000).toISOString().slice(0, 19);

  // Two columns: Date 2025-06-12 and Time 23:00:00 (UTC), crossing midnight after the 30th row.
  const twoColumns: string[] = ['Date,Time,Seeing,Zenith'];
  for (let index = 0; index < 90; index += 1) {
    const [date = '', time = ''] = iso(index).split('T');
    twoColumns.push(`${date},${time},${seeing()},${zenith()}`);
  }
  twoColumns[19] = (twoColumns[19] ?? '').replace(/,\d\d:\d\d:\d\d,/, ',24:10:00,'); // line 20: hour 24
  twoColumns[59] = (twoColumns[59] ?? '').replace(/^([^,]*,[^,]*,)[^,]*/, '$1'); // line 60: empty seeing
  writeFileSync(join(here, 'format-two-columns.csv'), `${twoColumns.join('\n')}\n`);

  // Runs of blanks: columns padded with spaces (a tab here and there), leading blanks on every row.
  const pad = (text: string, width: number) => text.padEnd(width, ' ');
  const aligned: string[] = ['# aligned columns, invented data', `  ${pad('time_utc', 22)}${pad('seeing_arcsec', 15)}${pad('airmass', 9)}flux`];
  for (let index = 0; index < 80; index += 1) {
    const airmass = (1 / Math.cos((Number(zenith()) * Math.PI) / 180)).toFixed(3);
    const gap = index % 7 === 3 ? '\t' : '   ';
    aligned.push(`  ${pad(`${iso(index)}Z`, 22)}${pad(seeing(), 15)}${airmass}${gap}${Math.round(4000 + 3000 * random())}`);
  }
  aligned[31] = (aligned[31] ?? '').replace(/\s+\d+$/, ''); // line 32: the flux is missing (3 fields for 4 columns)
  aligned[56] = (aligned[56] ?? '').replace(/(\S+\s+\S+\s+)\S+/, '$10.950'); // line 57: airmass 0.950 < 1
  writeFileSync(join(here, 'format-whitespace.txt'), `${aligned.join('\n')}\n`);

  // Semicolons with decimal commas and a remark holding one comma: commas and semicolons tie at 3 a line, so the
  // detection takes the comma; --delimiter ';' reads it right.
  const tied: string[] = ['time_utc;seeing_arcsec;zenith_deg;remarks (wind, cloud, dome, moon)'];
  for (let index = 0; index < 50; index += 1) tied.push(`${iso(index)}Z;${seeing().replace('.', ',')};${zenith().replace('.', ',')};wind ${1 + Math.floor(6 * random())} m/s, clear`);
  tied[29] = (tied[29] ?? '').replace(/;[^;]*;/, ';-0,400;'); // line 30: negative seeing
  writeFileSync(join(here, 'format-delimiter.csv'), `${tied.join('\n')}\n`);

  // A preamble of five plain-text lines (no '#'), the column names on line 6.
  const preamble = ['Seeing monitor export (invented data)', 'Station: Basalt Shelf, mast B', 'Operator: night crew', '', 'Samples follow, one a line.'];
  const withPreamble: string[] = [...preamble, 'time_utc;seeing_arcsec;zenith_deg'];
  for (let index = 0; index < 60; index += 1) withPreamble.push(`${iso(index)}Z;${seeing()};${zenith()}`);
  withPreamble[39] = (withPreamble[39] ?? '').replace(/;[^;]*$/, ';95.0'); // line 40: zenith angle 95°
  writeFileSync(join(here, 'format-preamble.txt'), `${withPreamble.join('\n')}\n`);
  console.log('format-two-columns.csv 90 rows, format-whitespace.txt 80 rows, format-delimiter.csv 50 rows, format-preamble.txt 60 rows after 5 preamble lines');
}
rmSync(scratch, { recursive: true, force: true });
