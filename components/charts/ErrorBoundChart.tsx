'use client';
/**
 * Error magnitude against its a-priori bound over frequency, with the acceptance band and its stored
 * verdict (decided by the worker; lib/acceptance.ts). The verdict's sentence is written once, inside the
 * chart's frame in the row the option leaves free above the plot area, as page text (not canvas), so it
 * wraps instead of being clipped, can be read aloud and found.
 */
import { acceptanceSentence } from '@/lib/acceptance';
import { EChart, useBuiltOption } from './EChart';
import { buildErrorBoundOption, type ErrorBoundChartData } from './error-bound-option';
import { plotGrid } from './chart-base';
import { VERDICT_COLORS } from './theme';
import { useChartTheme } from './useChartTheme';

export interface ErrorBoundChartProps extends ErrorBoundChartData {
  readonly height?: number | string;
  readonly title?: string;
}

/** The plot area's left and right margins (chart-base.ts), so the sentence lines up with the plot. */
const MARGINS = plotGrid({ top: 0 });

export function ErrorBoundChart({
  frequencies,
  error,
  bound,
  boundLabel,
  errorLabel,
  acceptance,
  timeBase,
  height = 340,
  title = 'Error against bound',
}: ErrorBoundChartProps) {
  const theme = useChartTheme();
  const built = useBuiltOption(
    () => buildErrorBoundOption({ frequencies, error, bound, boundLabel, errorLabel, acceptance, timeBase }, theme),
    [frequencies, error, bound, boundLabel, errorLabel, acceptance, timeBase, theme],
  );
  const verdict = acceptance && built.problem === null ? acceptance : null;
  return (
    <figure className="panel p-4">
      <figcaption className="mb-2 text-sm font-medium">{title}</figcaption>
      <div className="relative">
        <EChart built={built} height={height} testId="error-bound-chart" />
        {verdict ? (
          <p
            role="status"
            data-testid="acceptance-verdict"
            data-status={verdict.status}
            className="num absolute text-xs font-semibold leading-4"
            style={{ color: VERDICT_COLORS[verdict.status], left: MARGINS.left, right: MARGINS.right, top: 24 }}
          >
            {acceptanceSentence(verdict, timeBase)}
          </p>
        ) : null}
      </div>
    </figure>
  );
}
