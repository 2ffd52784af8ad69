'use client';
/**
 * Hankel singular values (log), cumulative energy and the error bound against order, with the chosen order
 * marked. The chart opens on the meaningful values (hankel-option.ts); the note under it says which, and
 * what the shaded floor is, in words.
 */
import { numericalOrder, roundingFloor } from '@/reduction/hankel-figures';
import { formatNumber } from '@/lib/format';
import { EChart, useBuiltOption } from './EChart';
import { buildHankelOption, floorInView, OPENING_MAX_VALUES, openingView, type HankelChartData } from './hankel-option';
import { useChartTheme } from './useChartTheme';

export interface HankelChartProps extends HankelChartData {
  readonly height?: number | string;
  readonly title?: string;
}

export function HankelChart({ hankelSingularValues, order, errorBound, energyMeasure, height = 360, title = 'Hankel singular values' }: HankelChartProps) {
  const theme = useChartTheme();
  const built = useBuiltOption(
    () => buildHankelOption({ hankelSingularValues, order, errorBound, energyMeasure }, theme),
    [hankelSingularValues, order, errorBound, energyMeasure, theme],
  );
  const n = hankelSingularValues.length;
  const shown = built.problem === null && n > 0 && hankelSingularValues[0] > 0 ? openingView(hankelSingularValues, order) : null;
  return (
    <figure className="panel p-4">
      <figcaption className="mb-2 text-sm font-medium">{title}</figcaption>
      <EChart built={built} height={height} testId="hankel-chart" />
      {shown !== null ? (
        <p className="mt-2 text-xs text-graphite-soft" data-testid="hankel-view" data-shown={shown} data-count={n} data-meaningful={numericalOrder(hankelSingularValues)}>
          {shown < n
            ? `Opens on σ1…σ${shown} of ${n}: the values above σ1·10⁻¹², at most the first ${OPENING_MAX_VALUES}, and the chosen order; drag the slider or scroll over the chart for the rest. `
            : `All ${n} values. `}
          {floorInView(hankelSingularValues, order, errorBound) ? 'Shaded: the rounding floor' : 'The rounding floor'} σ1·n·ε ={' '}
          {formatNumber(roundingFloor(hankelSingularValues))}
          {floorInView(hankelSingularValues, order, errorBound) ? '' : ', below this view'}; values under it cannot be told from rounding.
        </p>
      ) : null}
    </figure>
  );
}
