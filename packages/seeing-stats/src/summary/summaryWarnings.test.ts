import { describe, expect, it } from 'vitest';
import { createRandom, normalDeviate } from '../stats/random.js';
import { checkLongitudeSign } from './checkLongitudeSign.js';
import { summarizeSeeing } from './summarizeSeeing.js';
import { summaryWarnings } from './summaryWarnings.js';

const HOUR_MS = 3_600_000;

/** A monitor at 70.4° W, 30.2° S (invented) logging every 10 minutes from local 21:00 to 04:00, 40 nights in May. */
function westernNights(): { timeMs: Float64Array; seeingArcsec: Float64Array } {
  const random = createRandom(12);
  const times: number[] = [];
  const seeing: number[] = [];
  for (let night = 0; night < 40; night += 1) {
    const localEveningUtcMs = Date.UTC(2025, 4, 1 + night, 21) + (70.4 / 15) * HOUR_MS;
    for (let step = 0; step < 42; step += 1) {
      times.push(localEveningUtcMs + step * 10 * 60_000);
      seeing.push(0.8 * Math.exp(0.3 * normalDeviate(random)));
    }
  }
  return { timeMs: Float64Array.from(times), seeingArcsec: Float64Array.from(seeing) };
}

describe('checkLongitudeSign', () => {
  it('suspects a western site entered with an eastern longitude, and not the right one', () => {
    const { timeMs } = westernNights();
    const wrong = checkLongitudeSign(timeMs, { latitudeDeg: -30.2, longitudeDeg: 70.4 }, -18);
    // At +70.4° the log's local 21:00–04:00 falls at about 06:20–13:20 local: mostly daylight (sun altitude from astronomy-engine)
    expect(wrong.rejectedShare).toBeGreaterThan(0.5);
    expect(wrong.mirroredRejectedShare).toBeLessThan(0.05);
    expect(wrong.suspicious).toBe(true);
    const right = checkLongitudeSign(timeMs, { latitudeDeg: -30.2, longitudeDeg: -70.4 }, -18);
    expect(right.suspicious).toBe(false);
    expect(right.rejectedShare).toBeLessThan(0.05);
    expect(checkLongitudeSign([], { latitudeDeg: 0, longitudeDeg: 10 }, -18).suspicious).toBe(false);
  });
});

describe('summary warnings', () => {
  it('name pooled response sets, mixed heights, a suspect longitude sign and a seeing log without wavelength', () => {
    const { timeMs } = westernNights();
    const warnings = summaryWarnings({
      nights: 40,
      longitudeGiven: true,
      context: {
        responseSets: ['z-tilt', 'g-tilt', 'z-tilt'],
        monitorHeightsM: [5, 5, 12, null],
        measurement: { measure: 'r0', wavelengthGiven: false },
        longitudeSign: checkLongitudeSign(timeMs, { latitudeDeg: -30.2, longitudeDeg: 70.4 }, -18),
      },
    });
    expect(warnings.map((warning) => warning.code)).toEqual(['mixed_response_sets', 'mixed_monitor_heights', 'longitude_sign', 'wavelength_not_given']);
    expect(warnings[0]?.message).toContain('z-tilt, g-tilt');
    expect(warnings[1]?.message).toContain('5 m, 12 m, unknown');
    expect(warnings[2]?.message).toContain('check the sign of the longitude (east positive)');
    // r0 at 650 nm read as 500 nm: r0 is too large by (650/500)^(6/5) = 1.370, seeing too small by 27 % (seeing-physics.md §1.2)
    expect(warnings[3]?.message).toContain('27 %');
  });
  it('say nothing about the wavelength for variance logs, nor about one response set or one height', () => {
    const warnings = summaryWarnings({ nights: 40, longitudeGiven: true, context: { responseSets: ['z-tilt', 'z-tilt'], monitorHeightsM: [7, 7], measurement: { measure: 'variance', wavelengthGiven: false } } });
    expect(warnings).toEqual([]);
  });
  it('warn about too few nights, an approximate interval and a missing longitude', () => {
    expect(summaryWarnings({ nights: 4, longitudeGiven: true }).map((warning) => warning.code)).toEqual(['too_few_nights']);
    expect(summaryWarnings({ nights: 12, longitudeGiven: true }).map((warning) => warning.code)).toEqual(['approximate_interval']);
    const noLongitude = summaryWarnings({ nights: 40, longitudeGiven: false });
    expect(noLongitude.map((warning) => warning.code)).toEqual(['no_site_longitude']);
    expect(noLongitude[0]?.message).toContain('split at 12:00 UTC');
  });
});

describe('fraction of time below a threshold', () => {
  it('has a night-bootstrap interval around it from 10 nights on', () => {
    const columns = westernNights();
    const summary = summarizeSeeing(columns, { longitudeDeg: -70.4, latitudeDeg: -30.2, bootstrapReplicates: 400 });
    expect(summary?.interval.status).toBe('ok');
    for (const key of ['0.6', '0.8', '1.0']) {
      const fraction = summary?.fractionBelow[key] ?? Number.NaN;
      const [low, high] = summary?.fractionBelowCi95[key] ?? [Number.NaN, Number.NaN];
      expect(low).toBeLessThan(fraction);
      expect(high).toBeGreaterThan(fraction);
      expect(low).toBeGreaterThanOrEqual(0);
      expect(high).toBeLessThanOrEqual(1);
    }
    // independent samples (no night effect here): the interval's half-width is near the binomial 1.96 √(p(1−p)/n)
    const fraction = summary?.fractionBelow['0.8'] ?? 0;
    const [low, high] = summary?.fractionBelowCi95['0.8'] ?? [0, 0];
    const binomialHalfWidth = 1.96 * Math.sqrt((fraction * (1 - fraction)) / columns.seeingArcsec.length);
    expect((high - low) / 2).toBeGreaterThan(0.6 * binomialHalfWidth);
    expect((high - low) / 2).toBeLessThan(1.6 * binomialHalfWidth);
    expect(summary?.seasons.find((season) => season.code === 'MAM')?.name).toBe('autumn');
  });
});
