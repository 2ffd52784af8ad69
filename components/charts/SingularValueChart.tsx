'use client';
/** Largest singular value σmax(G(jω)) of full and reduced model over frequency: the MIMO gain plot. */
import { useState } from 'react';
import { MagnitudeScaleSwitch } from './BodeChart';
import { buildSingularValueOption, type MagnitudeScale, type SingularValueChartData } from './bode-option';
import { EChart, useBuiltOption } from './EChart';
import { useChartTheme } from './useChartTheme';

export interface SingularValueChartProps extends Omit<SingularValueChartData, 'magnitudeScale'> {
  readonly initialMagnitudeScale?: MagnitudeScale;
  readonly height?: number | string;
  readonly title?: string;
}

export function SingularValueChart({ frequencies, full, reduced, timeBase, initialMagnitudeScale = 'dB', height = 320, title = 'Largest singular value' }: SingularValueChartProps) {
  const [magnitudeScale, setMagnitudeScale] = useState<MagnitudeScale>(initialMagnitudeScale);
  const theme = useChartTheme();
  const built = useBuiltOption(
    () => buildSingularValueOption({ frequencies, full, reduced, timeBase, magnitudeScale }, theme),
    [frequencies, full, reduced, timeBase, magnitudeScale, theme],
  );
  return (
    <figure className="panel p-4">
      <div className="mb-2 flex flex-wrap items-center justify-between gap-2">
        <figcaption className="text-sm font-medium">{title}</figcaption>
        <MagnitudeScaleSwitch value={magnitudeScale} onChange={setMagnitudeScale} />
      </div>
      <EChart built={built} height={height} testId="singular-value-chart" />
    </figure>
  );
}
