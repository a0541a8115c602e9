/**
 * The panel network chart's data builder (src/features/dashboards/components/panel-network-chart.tsx):
 * a small invented network worked out by hand.
 */
import { describe, expect, it } from 'vitest';
import { panelNetworkMatrix } from '../../src/features/dashboards/components/panel-network-chart';

const sev = (links: number, value: number | null) => ({ value, se: null, ci95: null, n: 0, links });

describe('panelNetworkMatrix', () => {
  it('orders the main component first, mirrors every edge and names who is outside or least linked', () => {
    const m = panelNetworkMatrix(
      {
        components: [
          { classifiers: ['C01', 'C02', 'C03'], ratings: 10, assessments: 4 },
          { classifiers: ['C04', 'C05'], ratings: 2, assessments: 1 },
        ],
        edges: [
          { a: 'C01', b: 'C02', shared: 3 },
          { a: 'C02', b: 'C03', shared: 1 },
          { a: 'C04', b: 'C05', shared: 1 },
        ],
      },
      [
        { code: 'C01', severity: sev(1, 0.1) },
        { code: 'C02', severity: sev(2, 0) },
        { code: 'C03', severity: sev(1, -0.1) },
        { code: 'C04', severity: sev(1, null) },
        { code: 'C05', severity: sev(1, null) },
        { code: 'C06', severity: sev(0, null) },
      ],
    );
    expect(m.codes).toEqual(['C01', 'C02', 'C03', 'C04', 'C05', 'C06']);
    expect(m.cells).toHaveLength(6);
    expect(m.cells).toContainEqual({ a: 'C02', b: 'C01', shared: 3, main: true });
    expect(m.cells).toContainEqual({ a: 'C05', b: 'C04', shared: 1, main: false });
    expect(m.outside).toEqual(['C04', 'C05', 'C06']);
    expect(m.fewestLinks).toEqual([
      { code: 'C01', links: 1 },
      { code: 'C03', links: 1 },
      { code: 'C02', links: 2 },
    ]);
  });
});
