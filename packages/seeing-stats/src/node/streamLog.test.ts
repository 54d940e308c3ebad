import { Readable } from 'node:stream';
import { describe, expect, it } from 'vitest';
import { createRandom } from '../stats/random.js';
import { streamLog } from './streamLog.js';

const monitor = { apertureMm: 60, baselineMm: 200, wavelengthNm: 500, response: 'z-tilt' as const };
const site = { latitudeDeg: -27.42, longitudeDeg: -70.15 };

/** A log of about 200 kB: byte-order mark, non-ASCII comments, CRLF and LF, damaged rows, blank optional values. */
function logText(): string {
  const random = createRandom(5);
  const lines = ['\uFEFF# Invented log — not real data; “quotes” and é in a comment', 'time_utc,var_long_arcsec2,var_trans_arcsec2,zenith_deg,flux'];
  for (let row = 0; row < 4000; row += 1) {
    const time = new Date(Date.UTC(2025, 4, 1, 0, row)).toISOString().replace('.000', random() < 0.5 ? '' : '.250');
    const fields = [time, (0.2 + random()).toFixed(6), (0.2 + random()).toFixed(6), (random() * 70).toFixed(2), random() < 0.1 ? '' : String(Math.floor(random() * 40_000))];
    const damage = random();
    if (damage < 0.01) fields[1] = '1e-1';
    else if (damage < 0.02) fields[2] = '';
    else if (damage < 0.03) fields[0] = '2025-05-01 25:00';
    else if (damage < 0.035) fields.push('extra');
    else if (damage < 0.04) fields[0] = `${time.slice(0, 10)}→${time.slice(11)}`; // non-ASCII in a rejected row's text and message
    lines.push(random() < 0.02 ? `# é “comment” ${row}` : fields.join(','));
  }
  return lines.map((line, index) => `${line}${index % 3 === 0 ? '\r\n' : '\n'}`).join('');
}

async function outcomes(input: Readable): Promise<{ samples: string[]; rejects: string[]; rowsRead: number; linesTotal: number }> {
  const samples: string[] = [];
  const rejects: string[] = [];
  const result = await streamLog(input, { monitor, site, transientSamples: true }, {
    onSample: (sample, line) => samples.push(`${line} ${JSON.stringify(sample)}`),
    onReject: (line, reason, message, raw) => rejects.push(`${line} ${reason} ${message} ${raw}`),
  });
  return { samples, rejects, rowsRead: result.rowsRead, linesTotal: result.linesTotal };
}

describe('streamLog', () => {
  it('gives the same samples, rejections and counts from byte pieces of any size (rows read in place, Latin-1 for ASCII pieces) as from the whole text (every row through the full reader)', async () => {
    const text = logText();
    // One string: the reader sees it all as its first 64 KiB sample, with quotes assumed near, so no row is read in place.
    const expected = await outcomes(Readable.from([text]));
    expect(expected.samples.length).toBeGreaterThan(3000);
    expect(expected.rejects.length).toBeGreaterThan(50);
    const bytes = Buffer.from(text, 'utf8');
    const random = createRandom(9);
    // Odd piece sizes cut some multi-byte characters in two.
    for (const pieceBytes of [61 + Math.floor(random() * 7), 4093, 65_536, 131_072]) {
      const pieces: Buffer[] = [];
      for (let start = 0; start < bytes.length; start += pieceBytes) pieces.push(bytes.subarray(start, start + pieceBytes));
      const got = await outcomes(Readable.from(pieces));
      expect(got.rowsRead, `pieces of ${pieceBytes} bytes`).toBe(expected.rowsRead);
      expect(got.linesTotal).toBe(expected.linesTotal);
      expect(got.rejects).toEqual(expected.rejects);
      expect(got.samples).toEqual(expected.samples);
    }
  }, 30_000);
});
