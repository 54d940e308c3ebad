import { describe, expect, it } from 'vitest';
import { readingWarnings, WARN_UNUSABLE_SHARE } from './readingWarnings.js';

describe('reading warnings', () => {
  it('says nothing about a clean file, or one that loses only a few rows or only rows the filters drop', () => {
    expect(readingWarnings({ read: 1000, rejectedByReason: {} })).toEqual([]);
    expect(readingWarnings({ read: 1000, rejectedByReason: { missing_value: 60, non_physical: 40 } })).toEqual([]);
    expect(readingWarnings({ read: 1000, rejectedByReason: { sun_above_limit: 700, zenith_limit: 100 } })).toEqual([]);
  });
  it('warns about any line that could not be split into fields, naming the reasons', () => {
    const warnings = readingWarnings({ read: 1_000_000, rejectedByReason: { unterminated_quote: 1, line_too_long: 2 } });
    expect(warnings).toHaveLength(1);
    expect(warnings[0]?.code).toBe('lines_not_split');
    expect(warnings[0]?.message).toMatch(/^3 lines could not be split into fields \(line_too_long 2, unterminated_quote 1\)/);
  });
  it(`warns when more than ${WARN_UNUSABLE_SHARE * 100} % of the rows read are unusable, filters aside`, () => {
    const warnings = readingWarnings({ read: 1000, rejectedByReason: { implausible_seeing: 90, duplicate_time: 11, sun_above_limit: 500 } });
    expect(warnings).toEqual([{ code: 'many_rows_unusable', message: expect.stringMatching(/^101 of 1000 rows \(10\.1 %\) could not be used \(implausible_seeing 90, duplicate_time 11\)/) as string }]);
  });
  it('warns about a header without rows', () => {
    expect(readingWarnings({ read: 0, rejectedByReason: {} })).toEqual([{ code: 'no_data_rows', message: 'The file has a header line but no data rows.' }]);
  });
});
