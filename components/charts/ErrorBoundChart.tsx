'use client';
/**
 * Error magnitude against its a-priori bound over frequency, with the acceptance band and its verdict.
 * The verdict is also written in the page text (not only on the canvas) so it can be read aloud and found.
 */
import { useMemo } from 'react';
import { acceptanceVerdict } from './acceptance';
import { EChart, useBuiltOption } from './EChart';
import { buildErrorBoundOption, type ErrorBoundChartData } from './error-bound-option';
import { VERDICT_COLORS } from './theme';
import { useChartTheme } from './useChartTheme';

export interface ErrorBoundChartProps extends ErrorBoundChartData {
  readonly height?: number | string;
  readonly title?: string;
}

export function ErrorBoundChart({
  frequencies,
  error,
  bound,
  boundLabel,
  errorLabel,
  acceptance,
  timeUnit,
  height = 340,
  title = 'Error against bound',
}: ErrorBoundChartProps) {
  const theme = useChartTheme();
  const built = useBuiltOption(
    () => buildErrorBoundOption({ frequencies, error, bound, boundLabel, errorLabel, acceptance, timeUnit }, theme),
    [frequencies, error, bound, boundLabel, errorLabel, acceptance, timeUnit, theme],
  );
  const verdict = useMemo(() => {
    if (!acceptance || built.problem !== null) return null;
    return acceptanceVerdict(frequencies, error, acceptance, timeUnit);
  }, [frequencies, error, acceptance, timeUnit, built.problem]);
  const color = verdict ? (verdict.status === 'pass' ? VERDICT_COLORS.pass : verdict.status === 'fail' ? VERDICT_COLORS.fail : VERDICT_COLORS.notCovered) : undefined;
  return (
    <figure className="panel p-4">
      <figcaption className="mb-2 text-sm font-medium">{title}</figcaption>
      {verdict ? (
        <p role="status" data-testid="acceptance-verdict" data-status={verdict.status} className="num mb-2 text-sm font-semibold" style={{ color }}>
          {verdict.text}
        </p>
      ) : null}
      <EChart built={built} height={height} testId="error-bound-chart" />
    </figure>
  );
}
