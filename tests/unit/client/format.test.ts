import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  formatCount,
  formatDate,
  formatDateTime,
  formatEventLevel,
  formatInteger,
  formatNumber,
  formatPercent,
  formatPoints,
  formatSeason,
  formatSigned,
  setFormatLocale,
} from '../../../src/lib/format';

describe('the app’s formatter', () => {
  beforeAll(() => setFormatLocale('en-GB'));
  afterAll(() => setFormatLocale(undefined));

  it('writes negatives with a true minus sign and no sign on a value that rounds to zero', () => {
    expect(formatNumber(-0.314)).toBe('−0.31');
    expect(formatNumber(-0.001)).toBe('0.00');
    expect(formatNumber(0.9712, 3)).toBe('0.971');
    expect(formatNumber(null)).toBe('—');
    expect(formatSigned(0.123)).toBe('+0.12');
    expect(formatSigned(-0.5)).toBe('−0.50');
    expect(formatSigned(0.001)).toBe('0.00');
    expect(formatNumber(-1234.5, 1)).toBe('−1,234.5');
  });

  it('writes shares, counts and points', () => {
    expect(formatPercent(0.974)).toBe('97\u00a0%');
    expect(formatPercent(-0.05, 1)).toBe('−5.0\u00a0%');
    expect(formatInteger(1933)).toBe('1,933');
    expect(formatPoints(0.25)).toBe('0.25 points');
    expect(formatPoints(1, 0)).toBe('1 point');
  });

  it('puts nouns in the right number', () => {
    expect(formatCount(1, 'new assessment')).toBe('1 new assessment');
    expect(formatCount(0, 'new assessment')).toBe('0 new assessments');
    expect(formatCount(2300, 'rating')).toBe('2,300 ratings');
    expect(formatCount(2, 'analysis', 'analyses')).toBe('2 analyses');
  });

  it('has one style for dates and one for date-times, calendar dates kept on their day', () => {
    expect(formatDate('2026-12-04')).toBe('4 Dec 2026');
    expect(formatDate(new Date(2026, 11, 4, 23, 59))).toBe('4 Dec 2026');
    expect(formatDateTime(new Date(2026, 11, 4, 19, 55))).toBe('4 Dec 2026, 19:55');
    expect(formatDate(null)).toBe('—');
    expect(formatDate('not a date')).toBe('not a date');
  });

  it('writes seasons with an en dash and event levels in words', () => {
    expect(formatSeason(2022)).toBe('2022–23');
    expect(formatSeason('2022-23')).toBe('2022–23');
    expect(formatSeason('2099/2100')).toBe('2099–00');
    expect(formatSeason('2024–25')).toBe('2024–25');
    expect(formatEventLevel('national')).toBe('National');
    expect(formatEventLevel('championship')).toBe('National championship');
    expect(formatEventLevel('youth_league')).toBe('Youth league');
  });
});
