'use client';
/** Step, impulse or uploaded-input response of one channel, full vs reduced, with the absolute error below. */
import { EChart, useBuiltOption } from './EChart';
import { buildTimeResponseOption, type TimeResponseChartData } from './time-response-option';
import { useChartTheme } from './useChartTheme';

export interface TimeResponseChartProps extends TimeResponseChartData {
  readonly height?: number | string;
  readonly title?: string;
}

const DEFAULT_TITLES = { step: 'Step response', impulse: 'Impulse response', input: 'Response to the uploaded input' } as const;

export function TimeResponseChart({ kind, full, reduced, timeBase, channelLabel, errorScale, height = 460, title }: TimeResponseChartProps) {
  const theme = useChartTheme();
  const built = useBuiltOption(
    () => buildTimeResponseOption({ kind, full, reduced, timeBase, channelLabel, errorScale }, theme),
    [kind, full, reduced, timeBase, channelLabel, errorScale, theme],
  );
  return (
    <figure className="panel p-4">
      <figcaption className="mb-2 text-sm font-medium">
        {title ?? DEFAULT_TITLES[kind]}
        {channelLabel ? <span className="num text-graphite-soft"> {channelLabel}</span> : null}
      </figcaption>
      <EChart built={built} height={height} testId={`time-response-${kind}`} />
    </figure>
  );
}
