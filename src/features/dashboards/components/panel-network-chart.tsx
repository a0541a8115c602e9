import * as Plot from '@observablehq/plot';
import type { ClassifierRow, PanelNetworkData } from '../../../../shared/schemas/analytics';
import { CHART_COLORS, INK, PlotFigure } from '../../../components/plot-figure';
import { integer } from '../../../lib/stat-format';

export interface NetworkCell {
  a: string;
  b: string;
  shared: number;
  /** The pair is in the main component (their severities are on the common scale). */
  main: boolean;
}

export interface NetworkMatrix {
  /** Classifier codes in display order: the main component first, then the others; by code within each. */
  codes: string[];
  cells: NetworkCell[];
  /** Classifiers outside the main component, with the reason their severity is not shown. */
  outside: string[];
  /** The three classifiers with the fewest links in the main component (hardest to compare). */
  fewestLinks: { code: string; links: number }[];
}

/**
 * The panel network as an adjacency matrix: one cell per pair of classifiers who shared an
 * assessment (both halves of the symmetric matrix), ordered by component. Pure: data in, data out.
 */
export function panelNetworkMatrix(network: PanelNetworkData, rows: Pick<ClassifierRow, 'code' | 'severity'>[]): NetworkMatrix {
  const mainSet = new Set(network.components[0]?.classifiers ?? []);
  const seen = new Set(rows.map((r) => r.code));
  const ordered = network.components.flatMap((c) => c.classifiers);
  for (const code of [...seen].sort()) if (!ordered.includes(code)) ordered.push(code);
  const cells: NetworkCell[] = network.edges.flatMap((e) => {
    const main = mainSet.has(e.a) && mainSet.has(e.b);
    return [
      { a: e.a, b: e.b, shared: e.shared, main },
      { a: e.b, b: e.a, shared: e.shared, main },
    ];
  });
  const fewestLinks = rows
    .filter((r) => mainSet.has(r.code))
    .map((r) => ({ code: r.code, links: r.severity.links }))
    .sort((x, y) => x.links - y.links || (x.code < y.code ? -1 : 1))
    .slice(0, 3);
  return {
    codes: ordered,
    cells,
    outside: ordered.filter((c) => !mainSet.has(c)),
    fewestLinks,
  };
}

/** Who shared assessments with whom: the panel network behind the severities, as an adjacency matrix. */
export function PanelNetworkChart({
  network,
  rows,
  fileName,
}: {
  network: PanelNetworkData;
  rows: Pick<ClassifierRow, 'code' | 'severity'>[];
  fileName: string;
}) {
  const m = panelNetworkMatrix(network, rows);
  const max = Math.max(1, ...m.cells.map((c) => c.shared));
  const summary = [
    `${m.codes.length - m.outside.length} classifiers are linked through shared assessments and have a severity on the common scale.`,
    m.outside.length ? `Not linked to them, so without a severity: ${m.outside.join(', ')}.` : 'Every classifier is linked to the others.',
    m.fewestLinks.length ? `Fewest links (hardest to compare): ${m.fewestLinks.map((f) => `${f.code} with ${f.links}`).join(', ')}.` : '',
    'Darker cells: more shared assessments; an empty cell: the two never sat together.',
  ]
    .filter(Boolean)
    .join(' ');
  return (
    <PlotFigure
      title="Panel network: assessments shared by each pair of classifiers"
      summary={summary}
      fileName={fileName}
      deps={[network, rows]}
      build={(width) => {
        const size = Math.min(Math.max(width, 360), 700);
        return {
          width: size,
          height: size,
          marginLeft: 52,
          marginBottom: 52,
          padding: 0.05,
          x: { label: 'Classifier (code)', domain: m.codes, tickRotate: -90 },
          y: { label: 'Classifier (code)', domain: m.codes },
          color: {
            type: 'sqrt',
            domain: [0, max],
            range: ['#f3d7b0', CHART_COLORS[0]],
          },
          marks: [
            Plot.frame({ stroke: '#dcd8cf' }),
            Plot.cell(
              m.cells.filter((c) => c.main),
              { x: 'a', y: 'b', fill: 'shared', inset: 0.5 },
            ),
            Plot.cell(
              m.cells.filter((c) => !c.main),
              { x: 'a', y: 'b', fill: '#a63d2f', inset: 0.5 },
            ),
            Plot.tip(
              m.cells,
              Plot.pointer({
                x: 'a',
                y: 'b',
                title: (c: NetworkCell) =>
                  `${c.a} and ${c.b}: ${integer.format(c.shared)} shared assessment${c.shared === 1 ? '' : 's'}${c.main ? '' : ' (outside the main network)'}`,
              }),
            ),
          ],
          style: { color: INK },
        };
      }}
    >
      <p className="text-sm text-muted">
        Colour: shared assessments (0 to {integer.format(max)}, square-root scale)
        {m.outside.length ? '; red: pairs outside the main network' : ''}.
      </p>
    </PlotFigure>
  );
}
