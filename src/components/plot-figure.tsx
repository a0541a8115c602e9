import * as Plot from '@observablehq/plot';
import { useEffect, useId, useRef, useState } from 'react';
import { downloadBlob } from '../lib/download';

export interface PlotFigureProps {
  /** Shown above the chart and used as its accessible name. */
  title: string;
  /** A short text summary of what the chart shows, read by screen readers (and shown on request). */
  summary: string;
  /** Builds Plot's options for the available width (px). Axes must carry labels with units. */
  build: (width: number) => Plot.PlotOptions;
  /** File name of the downloads, without extension. */
  fileName: string;
  /** Called with the datum under the pointer when the chart is clicked (marks with `tip` or a pointer transform). */
  onSelect?: (datum: unknown) => void;
  /** Redraws when any of these change (build is not compared). */
  deps: readonly unknown[];
  /** Fixed height in px (default: Plot's). */
  height?: number;
  className?: string;
  children?: React.ReactNode;
}

const FONT = 'Inter, ui-sans-serif, system-ui, sans-serif';

/**
 * One Observable Plot chart: renders into a ref, replaces the chart when its data or width
 * change, removes it on unmount. Gives it a title, a text summary for screen readers, and SVG
 * and PNG downloads.
 */
export function PlotFigure({ title, summary, build, fileName, onSelect, deps, height, className = '', children }: PlotFigureProps) {
  const holder = useRef<HTMLDivElement>(null);
  const [width, setWidth] = useState(0);
  const titleId = useId();
  const summaryId = useId();
  const selectRef = useRef(onSelect);
  selectRef.current = onSelect;

  useEffect(() => {
    const el = holder.current;
    if (!el) return;
    const observer = new ResizeObserver((entries) => {
      const w = Math.floor(entries[0]?.contentRect.width ?? 0);
      setWidth((prev) => (Math.abs(prev - w) > 8 ? w : prev));
    });
    observer.observe(el);
    setWidth(Math.floor(el.getBoundingClientRect().width));
    return () => observer.disconnect();
  }, []);

  useEffect(() => {
    const el = holder.current;
    if (!el || width <= 0) return;
    const options = build(width);
    const chart = Plot.plot({
      width,
      height,
      ...options,
      style: {
        fontFamily: FONT,
        fontSize: '12px',
        background: 'transparent',
        overflow: 'visible',
        ...(typeof options.style === 'object' ? options.style : {}),
      },
    });
    chart.setAttribute('aria-hidden', 'true');
    const click = () => {
      const value = (chart as unknown as { value?: unknown }).value;
      if (value !== undefined && value !== null) selectRef.current?.(value);
    };
    if (selectRef.current) {
      chart.addEventListener('click', click);
      (chart as HTMLElement).style.cursor = 'pointer';
    }
    el.replaceChildren(chart);
    return () => {
      chart.removeEventListener('click', click);
      chart.remove();
    };
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [width, height, ...deps]);

  const svgText = (): string | null => {
    const svg = holder.current?.querySelector('svg');
    if (!svg) return null;
    const clone = svg.cloneNode(true) as SVGSVGElement;
    clone.setAttribute('xmlns', 'http://www.w3.org/2000/svg');
    clone.removeAttribute('aria-hidden');
    const titleEl = document.createElementNS('http://www.w3.org/2000/svg', 'title');
    titleEl.textContent = title;
    clone.insertBefore(titleEl, clone.firstChild);
    const bg = document.createElementNS('http://www.w3.org/2000/svg', 'rect');
    bg.setAttribute('width', '100%');
    bg.setAttribute('height', '100%');
    bg.setAttribute('fill', 'white');
    clone.insertBefore(bg, titleEl.nextSibling);
    return new XMLSerializer().serializeToString(clone);
  };

  const downloadSvg = () => {
    const text = svgText();
    if (text) downloadBlob(new Blob([text], { type: 'image/svg+xml' }), `${fileName}.svg`);
  };

  const downloadPng = () => {
    const svg = holder.current?.querySelector('svg');
    const text = svgText();
    if (!svg || !text) return;
    const { width: w, height: h } = svg.getBoundingClientRect();
    const scale = 2;
    const url = URL.createObjectURL(new Blob([text], { type: 'image/svg+xml' }));
    const img = new Image();
    img.onload = () => {
      const canvas = document.createElement('canvas');
      canvas.width = Math.ceil(w * scale);
      canvas.height = Math.ceil(h * scale);
      const g = canvas.getContext('2d');
      if (!g) return;
      g.fillStyle = 'white';
      g.fillRect(0, 0, canvas.width, canvas.height);
      g.scale(scale, scale);
      g.drawImage(img, 0, 0, w, h);
      URL.revokeObjectURL(url);
      canvas.toBlob((blob) => blob && downloadBlob(blob, `${fileName}.png`), 'image/png');
    };
    img.src = url;
  };

  return (
    <figure className={`card space-y-3 ${className}`} aria-labelledby={titleId} aria-describedby={summaryId}>
      <div className="flex flex-wrap items-start gap-2">
        <h3 id={titleId} className="mr-auto">
          {title}
        </h3>
        <div className="flex gap-2">
          <button
            type="button"
            className="btn btn-quiet min-h-9 px-3 py-1 text-sm"
            onClick={downloadSvg}
            aria-label={`Download “${title}” as SVG`}
          >
            SVG
          </button>
          <button
            type="button"
            className="btn btn-quiet min-h-9 px-3 py-1 text-sm"
            onClick={downloadPng}
            aria-label={`Download “${title}” as PNG`}
          >
            PNG
          </button>
        </div>
      </div>
      <div ref={holder} className="plot-holder w-full overflow-x-auto" />
      <figcaption id={summaryId} className="text-sm text-muted">
        {summary}
      </figcaption>
      {children}
    </figure>
  );
}

/** The chart colours of src/index.css, for Plot (which needs literal values). */
export const CHART_COLORS = ['#2f6690', '#d9822b', '#3a9e8f', '#7d5ba6', '#8a8f94'] as const;
export const INK = '#1d2a33';
export const MUTED = '#5b6b75';
