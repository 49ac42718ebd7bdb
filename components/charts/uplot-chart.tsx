'use client';
import { useEffect, useRef } from 'react';
import uPlot from 'uplot';
import 'uplot/dist/uPlot.min.css';

export interface UplotChartProps {
  /** Options without width/height: the chart takes its container's width. */
  options: Omit<uPlot.Options, 'width' | 'height'>;
  data: uPlot.AlignedData;
  /** CSS pixels. */
  height?: number;
  /** Accessible description of what the chart shows (charts are images to a screen reader). */
  label: string;
  className?: string;
  testId?: string;
}

/**
 * The one uPlot wrapper: creates the chart, resizes it with its container, updates data in place
 * when only the data change, and destroys it on unmount. Feature charts build `options` and `data`.
 */
export function UplotChart({ options, data, height = 320, label, className = '', testId }: UplotChartProps) {
  const box = useRef<HTMLDivElement>(null);
  const plot = useRef<uPlot | null>(null);

  useEffect(() => {
    const el = box.current;
    if (!el) return;
    const u = new uPlot({ ...options, width: Math.max(200, el.clientWidth), height }, data, el);
    plot.current = u;
    const ro = new ResizeObserver(() => u.setSize({ width: Math.max(200, el.clientWidth), height }));
    ro.observe(el);
    return () => {
      ro.disconnect();
      u.destroy();
      plot.current = null;
    };
    // Options changes rebuild the chart; data changes are applied below without a rebuild.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [options, height]);

  useEffect(() => {
    plot.current?.setData(data);
  }, [data]);

  return <div ref={box} role="img" aria-label={label} data-testid={testId} className={`w-full ${className}`} />;
}
