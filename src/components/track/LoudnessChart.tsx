import 'uplot/dist/uPlot.min.css';
import { useEffect, useRef } from 'react';
import type uPlot from 'uplot';
import type { AudioMeasurements } from '@/lib/audio/types';

/** Short-term loudness over time (uPlot), with the profile's target band shaded. */
export function LoudnessChart({
  measurements,
  target,
}: {
  measurements: AudioMeasurements;
  target: { profileName: string; minLufs: number; maxLufs: number } | null;
}) {
  const holder = useRef<HTMLDivElement>(null);

  useEffect(() => {
    const element = holder.current;
    if (!element) return;
    let plot: uPlot | null = null;
    let cancelled = false;
    const { stepSeconds, shortTermLufs } = measurements.series.loudness;
    const xs = shortTermLufs.map((_, i) => (i + 1) * stepSeconds);
    const values = shortTermLufs.filter((v): v is number => v !== null);
    const low = Math.min(...values, target?.minLufs ?? 0, -30) - 3;
    const high = Math.max(...values, target?.maxLufs ?? -60, -6) + 2;
    let observer: ResizeObserver | null = null;
    void import('uplot').then(({ default: UPlot }) => {
      if (cancelled) return;
      plot = new UPlot(
        {
          width: element.clientWidth || 600,
          height: 220,
          scales: { x: { time: false }, y: { range: [Math.max(-70, low), Math.min(3, high)] } },
          axes: [
            { label: 'time (s)', stroke: '#4a6072' },
            { label: 'short-term LUFS', stroke: '#4a6072', size: 60 },
          ],
          legend: { show: false },
          cursor: { drag: { x: false, y: false } },
          series: [
            {},
            {
              label: 'Short-term loudness',
              stroke: '#15202b',
              width: 1.5,
              spanGaps: false,
              points: { show: false },
            },
          ],
          hooks: {
            drawClear: [
              (u) => {
                if (!target) return;
                const ctx = u.ctx;
                const top = u.valToPos(target.maxLufs, 'y', true);
                const bottom = u.valToPos(target.minLufs, 'y', true);
                ctx.save();
                ctx.fillStyle = 'rgba(31, 107, 74, 0.14)';
                ctx.fillRect(u.bbox.left, top, u.bbox.width, bottom - top);
                ctx.restore();
              },
            ],
          },
        },
        [xs, shortTermLufs.map((v) => (v === null ? null : v))] as uPlot.AlignedData,
        element,
      );
      observer = new ResizeObserver(() =>
        plot?.setSize({ width: element.clientWidth, height: 220 }),
      );
      observer.observe(element);
    });
    return () => {
      cancelled = true;
      observer?.disconnect();
      plot?.destroy();
    };
  }, [measurements, target]);

  return (
    <figure>
      <div ref={holder} data-testid="loudness-chart" className="w-full" />
      <figcaption className="mt-1 text-sm text-slate">
        Short-term loudness (3 s window) over time.{' '}
        {target
          ? `Shaded: ${target.profileName} target, ${target.minLufs.toFixed(1)} to ${target.maxLufs.toFixed(1)} LUFS integrated.`
          : 'None of this release’s profiles sets a loudness target.'}
      </figcaption>
    </figure>
  );
}
