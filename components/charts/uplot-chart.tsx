'use client';
import { useEffect, useRef, useState } from 'react';
import type uPlot from 'uplot';
import 'uplot/dist/uPlot.min.css';

/** Chart options without width/height: the chart takes its container's width. */
export type ChartOptions = Omit<uPlot.Options, 'width' | 'height'>;

export interface UplotChartProps {
  /**
   * The options, or a function of the uPlot module that makes them (for options that need uPlot's
   * own helpers, such as `paths.bars` or `tzDate`: the module is loaded on demand, see below).
   */
  options: ChartOptions | ((lib: typeof uPlot) => ChartOptions);
  data: uPlot.AlignedData;
  /** CSS pixels. */
  height?: number;
  /** Accessible description of what the chart shows (charts are images to a screen reader). */
  label: string;
  className?: string;
  testId?: string;
}

/** uPlot (about 22 kB compressed) is fetched with the first chart, not with every chart page's first load. */
const loadUplot = () => import('uplot').then((m) => m.default);

/**
 * The one uPlot wrapper: creates the chart, resizes it with its container, updates data in place
 * when only the data change, and destroys it on unmount. Feature charts build `options` and `data`.
 */
export function UplotChart({ options, data, height = 320, label, className = '', testId }: UplotChartProps) {
  const box = useRef<HTMLDivElement>(null);
  const plot = useRef<uPlot | null>(null);
  // The newest data, for a chart created after they arrived (uPlot still loading).
  const latest = useRef(data);
  const [failed, setFailed] = useState(false);

  useEffect(() => {
    const el = box.current;
    if (!el) return;
    let gone = false;
    let ro: ResizeObserver | null = null;
    void loadUplot().then((UPlot) => {
      if (gone) return;
      const opts = typeof options === 'function' ? options(UPlot) : options;
      const u = new UPlot({ ...opts, width: Math.max(200, el.clientWidth), height }, latest.current, el);
      plot.current = u;
      ro = new ResizeObserver(() => u.setSize({ width: Math.max(200, el.clientWidth), height }));
      ro.observe(el);
    }, () => {
      // Only the module's load: an error in drawing is not "could not load".
      if (!gone) setFailed(true);
    });
    return () => {
      gone = true;
      ro?.disconnect();
      plot.current?.destroy();
      plot.current = null;
    };
    // Options changes rebuild the chart; data changes are applied below without a rebuild.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [options, height]);

  useEffect(() => {
    latest.current = data;
    plot.current?.setData(data);
  }, [data]);

  return (
    <div ref={box} role="img" aria-label={label} data-testid={testId} className={`w-full ${className}`}>
      {failed && <p className="p-4 text-sm text-warning">The chart could not load: open this page once with a network, then it draws offline too.</p>}
    </div>
  );
}
