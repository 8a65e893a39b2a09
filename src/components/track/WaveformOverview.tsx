import { useEffect, useRef } from 'react';
import type { AudioMeasurements } from '@/lib/audio/types';
import { formatTime, type Marker, markerLanes, markerShapes } from './markers';

const HEIGHT_PX = 140;

/** Min/max waveform overview on a canvas, with finding markers above it as buttons. */
export function WaveformOverview({
  measurements,
  markers,
  positionSeconds,
  onSeek,
}: {
  measurements: AudioMeasurements;
  markers: Marker[];
  positionSeconds: number | null;
  onSeek: (seconds: number) => void;
}) {
  const canvas = useRef<HTMLCanvasElement>(null);
  const duration = measurements.format.durationSeconds;
  const { waveform } = measurements.series;

  useEffect(() => {
    const element = canvas.current;
    if (!element) return;
    const draw = () => {
      const ratio = window.devicePixelRatio || 1;
      const width = element.clientWidth;
      element.width = Math.round(width * ratio);
      element.height = Math.round(HEIGHT_PX * ratio);
      const ctx = element.getContext('2d');
      if (!ctx) return;
      ctx.scale(ratio, ratio);
      ctx.clearRect(0, 0, width, HEIGHT_PX);
      const mid = HEIGHT_PX / 2;
      const xOf = (seconds: number) => (duration > 0 ? (seconds / duration) * width : 0);
      // Head and tail silence shaded.
      ctx.fillStyle = 'rgba(138, 155, 171, 0.18)';
      ctx.fillRect(0, 0, xOf(measurements.silence.headSeconds), HEIGHT_PX);
      const tailStart = xOf(duration - measurements.silence.tailSeconds);
      ctx.fillRect(tailStart, 0, width - tailStart, HEIGHT_PX);
      // Full-scale guides.
      ctx.strokeStyle = '#dfe5ea';
      ctx.beginPath();
      ctx.moveTo(0, mid);
      ctx.lineTo(width, mid);
      ctx.stroke();
      ctx.fillStyle = '#2b3a48';
      const points = waveform.max.length;
      for (let i = 0; i < points; i++) {
        const x = xOf(i * waveform.pointSeconds);
        const w = Math.max(1, xOf(waveform.pointSeconds));
        const top = mid - (waveform.max[i] ?? 0) * mid;
        const bottom = mid - (waveform.min[i] ?? 0) * mid;
        ctx.fillRect(x, top, w, Math.max(1, bottom - top));
      }
      for (const marker of markers) {
        ctx.strokeStyle = marker.problem ? '#a32121' : '#4a6072';
        ctx.setLineDash([3, 3]);
        ctx.beginPath();
        ctx.moveTo(xOf(marker.atSeconds) + 0.5, 0);
        ctx.lineTo(xOf(marker.atSeconds) + 0.5, HEIGHT_PX);
        ctx.stroke();
        ctx.setLineDash([]);
      }
    };
    draw();
    const observer = new ResizeObserver(draw);
    observer.observe(element);
    return () => observer.disconnect();
  }, [duration, markers, measurements.silence, waveform]);

  return (
    <div>
      <div className="relative h-12" data-testid="waveform-markers">
        {markers.map((marker) => (
          <button
            key={`${marker.kind}-${marker.atSeconds}`}
            type="button"
            data-testid="finding-marker"
            data-kind={marker.kind}
            data-seconds={marker.atSeconds}
            title={`${marker.label} at ${formatTime(marker.atSeconds)}`}
            aria-label={`${marker.label} at ${formatTime(marker.atSeconds)}: play from here`}
            onClick={() => onSeek(marker.atSeconds)}
            className={`absolute -translate-x-1/2 px-1 text-sm leading-4 ${marker.problem ? 'text-fail' : 'text-slate'}`}
            style={{
              left: `${duration > 0 ? (marker.atSeconds / duration) * 100 : 0}%`,
              top: `${markerLanes[marker.kind] * 16}px`,
            }}
          >
            {markerShapes[marker.kind]}
          </button>
        ))}
      </div>
      <div className="relative">
        <canvas
          ref={canvas}
          data-testid="waveform-canvas"
          className="block w-full cursor-pointer rounded border border-mist bg-white"
          style={{ height: HEIGHT_PX }}
          role="img"
          aria-label={`Waveform overview, ${formatTime(duration)} long. Click to play from a point.`}
          onClick={(event) => {
            const box = event.currentTarget.getBoundingClientRect();
            onSeek(((event.clientX - box.left) / box.width) * duration);
          }}
        />
        {positionSeconds !== null && duration > 0 && (
          <div
            aria-hidden="true"
            className="pointer-events-none absolute top-0 h-full w-px bg-buoy"
            style={{ left: `${(positionSeconds / duration) * 100}%` }}
          />
        )}
      </div>
      <div className="figures mt-1 flex justify-between text-xs text-slate">
        <span>00:00.000</span>
        <span>{formatTime(duration)}</span>
      </div>
    </div>
  );
}
