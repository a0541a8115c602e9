import { describe, expect, it } from 'vitest';
import { compareExports, differingAthletes, type ExportMember } from '../../../server/exports/differencing';

const m = (assessmentId: number, athleteId: number, fingerprint = 1): ExportMember => ({ assessmentId, athleteId, fingerprint });

describe('differencing between two exports', () => {
  it('is the symmetric difference of the athletes when whole athletes come and go', () => {
    const a = [m(1, 10), m(2, 10), m(3, 11), m(4, 12)];
    const b = [m(1, 10), m(2, 10), m(3, 11)];
    expect([...differingAthletes(a, b)]).toEqual([12]);
    expect([...differingAthletes(b, a)]).toEqual([12]);
    expect(differingAthletes(a, a).size).toBe(0);
  });

  it('counts an athlete kept in both whose assessments differ: one assessment more, or changed content', () => {
    const a = [m(1, 10), m(2, 10), m(3, 11)];
    expect([...differingAthletes([...a, m(9, 11)], a)]).toEqual([11]);
    expect([...differingAthletes([m(1, 10), m(2, 10, 7), m(3, 11)], a)]).toEqual([10]);
  });

  it('reports the athletes with identical assessments in both', () => {
    const { differing, shared } = compareExports([m(1, 10), m(2, 11), m(3, 12, 5)], [m(1, 10), m(3, 12), m(4, 13)]);
    expect([...shared]).toEqual([10]);
    expect([...differing].sort()).toEqual([11, 12, 13]);
  });
});
