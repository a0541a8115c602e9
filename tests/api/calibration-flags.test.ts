/**
 * The calibration flags on the demo and after data or thresholds change (decision record 0008):
 * - the demo's planted effects: C05 drifts half a class upwards from 2024-07-01 → `drift` up
 *   near that date; C12 rates a steady quarter class low → `bias` and no `drift`; at most one
 *   other classifier flagged;
 * - flags stay true: after an import that plants a lean is reverted, and after a lowered
 *   threshold is put back, no page shows the flag as met, and every flag's counts and dates
 *   agree with the classifier's page.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { isoDateToDay } from '../../server/analysis';
import { DEFAULT_FLAG_THRESHOLDS, type CalibrationFlag } from '../../shared/schemas/analytics';
import { createTestApp, signedInAgent, type TestApp } from '../helpers/test-app';
import { upload } from './imports/helpers';

const base = '/api/federations/kestrel-coast/analytics';
type Agent = Awaited<ReturnType<typeof signedInAgent>>;

/** An invented import: 60 assessments in which C03 gives one class step above C07 and C08. */
function leanCsv(): Buffer {
  const lines = ['assessment_id,athlete_code,event_code,assessed_on,classifier_code,sport_class,panel_class,kind'];
  for (let i = 0; i < 60; i++) {
    const truth = 1 + ((i * 3) % 7) / 2; // 1.0 … 4.0
    const id = `LEAN-${String(i + 1).padStart(3, '0')}`;
    const athlete = `A${String(1 + i).padStart(4, '0')}`;
    const date = `2026-06-${String(11 + (i % 2)).padStart(2, '0')}`;
    for (const [code, cls] of [
      ['C07', truth],
      ['C08', truth],
      ['C03', truth + 0.5],
    ] as const) {
      lines.push(`${id},${athlete},S2526-CH,${date},${code},${cls.toFixed(1)},${truth.toFixed(1)},review`);
    }
  }
  return Buffer.from(`${lines.join('\n')}\n`);
}

const days = (a: string, b: string) => Math.abs(isoDateToDay(a)! - isoDateToDay(b)!);

describe('calibration flags on the demo, and after data or thresholds change', () => {
  let t: TestApp;
  let lead: Agent;
  let classifier: Agent;

  beforeAll(async () => {
    t = await createTestApp({ seed: 'demo' });
    lead = await signedInAgent(t.app, 'lead@demo.panelwise.test');
    classifier = await signedInAgent(t.app, 'classifier@demo.panelwise.test');
  });
  afterAll(() => t.close());

  const active = async () => ((await lead.get(`${base}/flags`)).body.flags as CalibrationFlag[]).filter((f) => f.status !== 'closed');

  /** Every page that shows flags: none shows a flag as met whose figures disagree with the classifier's page. */
  async function everyPageAgrees(): Promise<CalibrationFlag[]> {
    const rows = (await lead.get(`${base}/classifiers`)).body.classifiers as { code: string; n: number }[];
    const overview = (await lead.get(`${base}/overview`)).body.openFlags as CalibrationFlag[];
    const all = await active();
    expect(overview.map((f) => [f.id, f.stillMet]).sort()).toEqual(all.map((f) => [f.id, f.stillMet]).sort());
    for (const f of all) {
      const page = (await lead.get(`${base}/classifiers/${f.classifierCode}`)).body as {
        row: { n: number };
        drift: { points: { date: string }[] };
        flags: CalibrationFlag[];
      };
      const same = page.flags.find((g) => g.id === f.id)!;
      expect(same).toMatchObject({ stillMet: f.stillMet, evidence: f.evidence });
      // Counts and dates are today's: the classifier's ratings in panels, their first and last dates.
      expect(f.evidence.total).toBe(rows.find((r) => r.code === f.classifierCode)?.n ?? 0);
      expect(f.evidence.n).toBeLessThanOrEqual(page.row.n);
      if (f.evidence.n > 0) {
        expect(f.evidence.to).toBe(page.drift.points.at(-1)!.date);
        expect(f.evidence.from! >= page.drift.points[0].date).toBe(true);
      }
      if (f.rule === 'drift' && f.evidence.n > 0) {
        expect(f.evidence.n).toBe(page.row.n);
        expect(f.evidence.from).toBe(page.drift.points[0].date);
        expect(f.evidence.nBefore! + f.evidence.nAfter!).toBe(f.evidence.n);
      }
      if (!f.stillMet) expect(f.lapsedAt).not.toBeNull();
    }
    const mine = (await classifier.get(`${base}/me`)).body.flags as CalibrationFlag[];
    for (const f of mine.filter((g) => g.status !== 'closed'))
      expect(f).toMatchObject({ stillMet: all.find((g) => g.id === f.id)!.stillMet });
    return all;
  }

  it('the demo: C05 drift upwards near 2024-07-01, C12 a lean and no drift, at most one other classifier flagged', async () => {
    const flags = await everyPageAgrees();
    const met = flags.filter((f) => f.stillMet);
    const drift = met.find((f) => f.classifierCode === 'C05' && f.rule === 'drift');
    expect(drift).toBeDefined();
    const e = drift!.evidence;
    expect(e.direction).toBe('up');
    expect(days(e.changeDate!, '2024-07-01')).toBeLessThanOrEqual(60);
    expect(e.changeBetween![0] <= '2024-07-01' && e.changeBetween![1] >= '2024-07-01').toBe(true);
    expect(e.sizeAfter! - e.sizeBefore!).toBeGreaterThan(0.3);
    expect(e.pAdjusted!).toBeLessThanOrEqual(DEFAULT_FLAG_THRESHOLDS.falseDiscoveryRate);

    const c12 = met.filter((f) => f.classifierCode === 'C12').map((f) => f.rule);
    expect(c12).toContain('bias');
    expect(c12).not.toContain('drift');
    const c12bias = met.find((f) => f.classifierCode === 'C12' && f.rule === 'bias')!;
    expect(c12bias.evidence.direction).toBe('down');
    expect(c12bias.evidence.value!).toBeLessThan(-0.15);

    const others = new Set(met.filter((f) => f.classifierCode !== 'C05' && f.classifierCode !== 'C12').map((f) => f.classifierCode));
    expect(others.size).toBeLessThanOrEqual(1);

    // Plain words for the classifier (C12) on their own page; the method behind a disclosure.
    const mine = (await classifier.get(`${base}/me`)).body.flags as CalibrationFlag[];
    const plain = mine.find((f) => f.rule === 'bias')!.evidence.plain!;
    expect(plain).toMatch(/^In your last \d+ of \d+ ratings/);
    expect(plain).not.toMatch(/CUSUM|σ|p =|Benjamini/);
  });

  it('reverting an import that planted a lean: the flag is shown as no longer met, with today’s counts, everywhere', async () => {
    const dry = await upload(lead, { name: 'lean.csv', bytes: leanCsv() });
    expect(dry.status).toBe(200);
    expect((await lead.post(`/api/federations/kestrel-coast/imports/${dry.body.importId}/commit`)).status).toBe(200);
    // Reads wait for the evaluation at the new data version.
    const withLean = await everyPageAgrees();
    const lean = withLean.find((f) => f.classifierCode === 'C03' && f.rule === 'bias');
    expect(lean).toMatchObject({ status: 'open', stillMet: true });
    expect(lean!.evidence.direction).toBe('up');
    const totalWithLean = lean!.evidence.total!;

    expect((await lead.post(`/api/federations/kestrel-coast/imports/${dry.body.importId}/revert`)).status).toBe(200);
    const after = await everyPageAgrees();
    const lapsed = after.find((f) => f.id === lean!.id)!;
    expect(lapsed.stillMet).toBe(false);
    expect(lapsed.lapseReason).toMatch(/No longer met after a data change/);
    expect(lapsed.evidence.total).toBe(totalWithLean - 60);
    expect(lapsed.evidence.summary).not.toContain(String(totalWithLean));
    // The demo's own flags are untouched by the round trip.
    expect(after.find((f) => f.classifierCode === 'C05' && f.rule === 'drift')?.stillMet).toBe(true);
  });

  it('a lowered threshold put back: the extra flags are shown as no longer met, and met again when lowered again', async () => {
    const before = (await active()).filter((f) => f.stillMet).map((f) => f.id);
    expect((await lead.put(`${base}/flag-settings`).send({ ...DEFAULT_FLAG_THRESHOLDS, biasMin: 0.05, agreementGap: 0.02 })).status).toBe(
      200,
    );
    const lowered = (await everyPageAgrees()).filter((f) => f.stillMet && !before.includes(f.id));
    expect(lowered.length).toBeGreaterThan(0);

    expect((await lead.put(`${base}/flag-settings`).send(DEFAULT_FLAG_THRESHOLDS)).status).toBe(200);
    const restored = await everyPageAgrees();
    for (const f of lowered) {
      const now = restored.find((g) => g.id === f.id)!;
      expect(now.stillMet).toBe(false);
      expect(now.lapseReason).toMatch(/^No longer met after /);
    }
    const overview = (await lead.get(`${base}/overview`)).body.openFlags as CalibrationFlag[];
    for (const f of lowered) expect(overview.find((g) => g.id === f.id)?.stillMet).toBe(false);
    // The leads hear of it by e-mail too (the fake SMTP server keeps messages in outbox_messages).
    let mail: { subject: string; text_body: string } | undefined;
    for (let i = 0; i < 100 && !mail; i++) {
      mail = t.ctx.sqlite
        .prepare("select subject, text_body from outbox_messages where subject like '%no longer met%' order by id desc")
        .get() as typeof mail;
      if (!mail) await new Promise((r) => setTimeout(r, 50));
    }
    expect(mail?.subject).toMatch(/calibration flags? no longer met in Kestrel Coast/);
    expect(mail?.text_body).toContain(lowered[0].classifierCode);
    expect(
      restored
        .filter((f) => f.stillMet)
        .map((f) => f.id)
        .sort(),
    ).toEqual([...before].sort());

    await lead.put(`${base}/flag-settings`).send({ ...DEFAULT_FLAG_THRESHOLDS, biasMin: 0.05, agreementGap: 0.02 });
    const again = await active();
    for (const f of lowered) expect(again.find((g) => g.id === f.id)).toMatchObject({ stillMet: true, lapsedAt: null, lapseReason: null });
    await lead.put(`${base}/flag-settings`).send(DEFAULT_FLAG_THRESHOLDS);
  });
});
