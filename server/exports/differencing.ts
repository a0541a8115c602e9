/**
 * Differencing between two exports: the athletes whose exported data differ.
 *
 * An export is recorded as its assessments (database id, athlete id, a fingerprint of the
 * assessment's content: server/exports/build.ts `assessmentFingerprints`). Two exports differ
 * on an athlete when one holds an assessment of the athlete that the other lacks, or both hold
 * it with different content. Subtracting one export from the other isolates exactly these
 * athletes, so a new export is refused when 0 < |differing athletes| < k
 * (docs/decisions/0007-research-export.md, "Differencing"). When whole athletes come and go
 * this is the symmetric difference of the two athlete sets; it also covers an export that keeps
 * the same athletes but adds or drops some of their assessments (one event level more, one
 * import later).
 *
 * The same bound holds for what two exports share: read side by side, the assessments present in
 * both (matched by their content) single out the athletes they belong to as well, so a new
 * export that shares identical assessments of 0 < n < k athletes with an earlier one is refused too.
 */

export interface ExportMember {
  assessmentId: number;
  athleteId: number;
  fingerprint: number;
}

/** Athletes whose data differ between two exports. */
export function differingAthletes(a: readonly ExportMember[], b: readonly ExportMember[]): Set<number> {
  return compareExports(a, b).differing;
}

/** Athletes whose data differ between two exports, and athletes with an identical assessment in both. */
export function compareExports(a: readonly ExportMember[], b: readonly ExportMember[]): { differing: Set<number>; shared: Set<number> } {
  const inB = new Map<number, ExportMember>();
  for (const m of b) inB.set(m.assessmentId, m);
  const differing = new Set<number>();
  const shared = new Set<number>();
  const seen = new Set<number>();
  for (const m of a) {
    const other = inB.get(m.assessmentId);
    seen.add(m.assessmentId);
    if (!other) differing.add(m.athleteId);
    else if (other.fingerprint !== m.fingerprint || other.athleteId !== m.athleteId) {
      differing.add(m.athleteId);
      differing.add(other.athleteId);
    } else shared.add(m.athleteId);
  }
  for (const m of b) if (!seen.has(m.assessmentId)) differing.add(m.athleteId);
  return { differing, shared };
}
