'use client';
/** Hankel singular values (log), cumulative energy and the error bound against order, with the chosen order marked. */
import { EChart, useBuiltOption } from './EChart';
import { buildHankelOption, type HankelChartData } from './hankel-option';
import { useChartTheme } from './useChartTheme';

export interface HankelChartProps extends HankelChartData {
  readonly height?: number | string;
  readonly title?: string;
}

export function HankelChart({ hankelSingularValues, order, errorBound, energyMeasure, height = 340, title = 'Hankel singular values' }: HankelChartProps) {
  const theme = useChartTheme();
  const built = useBuiltOption(
    () => buildHankelOption({ hankelSingularValues, order, errorBound, energyMeasure }, theme),
    [hankelSingularValues, order, errorBound, energyMeasure, theme],
  );
  return (
    <figure className="panel p-4">
      <figcaption className="mb-2 text-sm font-medium">{title}</figcaption>
      <EChart built={built} height={height} testId="hankel-chart" />
    </figure>
  );
}
