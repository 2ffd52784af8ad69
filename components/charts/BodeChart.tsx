'use client';
/** Bode magnitude and phase of one input→output channel, full model solid graphite, reduced dashed teal. */
import { useState } from 'react';
import { buildBodeOption, type BodeChartData, type MagnitudeScale } from './bode-option';
import { EChart, useBuiltOption } from './EChart';
import { useChartTheme } from './useChartTheme';

export interface BodeChartProps extends Omit<BodeChartData, 'magnitudeScale'> {
  readonly initialMagnitudeScale?: MagnitudeScale;
  readonly height?: number | string;
  readonly title?: string;
}

export function BodeChart({
  frequencies,
  full,
  reduced,
  timeBase,
  channelLabel,
  initialMagnitudeScale = 'dB',
  height = 460,
  title = 'Bode plot',
}: BodeChartProps) {
  const [magnitudeScale, setMagnitudeScale] = useState<MagnitudeScale>(initialMagnitudeScale);
  const theme = useChartTheme();
  const built = useBuiltOption(
    () => buildBodeOption({ frequencies, full, reduced, timeBase, channelLabel, magnitudeScale }, theme),
    [frequencies, full, reduced, timeBase, channelLabel, magnitudeScale, theme],
  );
  return (
    <figure className="panel p-4">
      <div className="mb-2 flex flex-wrap items-center justify-between gap-2">
        <figcaption className="text-sm font-medium">
          {title}
          {channelLabel ? <span className="num text-graphite-soft"> {channelLabel}</span> : null}
        </figcaption>
        <MagnitudeScaleSwitch value={magnitudeScale} onChange={setMagnitudeScale} />
      </div>
      <EChart built={built} height={height} testId="bode-chart" />
    </figure>
  );
}

export function MagnitudeScaleSwitch({ value, onChange }: { value: MagnitudeScale; onChange: (s: MagnitudeScale) => void }) {
  return (
    <div role="group" aria-label="Magnitude scale" className="flex gap-1">
      {(['dB', 'absolute'] as const).map((s) => (
        <button
          key={s}
          type="button"
          aria-pressed={value === s}
          onClick={() => onChange(s)}
          className={`button-quiet ${value === s ? 'border-teal text-teal' : ''}`}
        >
          {s === 'dB' ? 'dB' : 'Absolute'}
        </button>
      ))}
    </div>
  );
}
