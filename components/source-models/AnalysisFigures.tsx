/**
 * The analysis of a source version in figures: dimensions and sparsity, the stability split, stiffness and
 * the largest stable explicit steps, norms and the DC gain. No client state; renders on the server.
 */
import { formatComplex, formatFrequency, formatNumber, formatPercent, formatTime } from '@/lib/format';
import type { AnalysisRecord, StepLimitRecord } from '@/lib/engine-tasks/records';

function Row({ label, value, note, testId }: { label: string; value: string; note?: string; testId?: string }) {
  return (
    <tr className="border-b border-rule last:border-b-0">
      <th scope="row" className="py-1.5 pr-4 text-left font-normal text-graphite-soft">
        {label}
      </th>
      <td className="num py-1.5 text-right whitespace-nowrap" data-testid={testId}>
        {value}
      </td>
      <td className="py-1.5 pl-3 text-xs text-graphite-soft">{note ?? ''}</td>
    </tr>
  );
}

function stepText(limit: StepLimitRecord, timeBase: string): { value: string; note?: string } {
  if (limit.maxStep === null) return { value: 'no limit', note: 'no pole limits a fixed step' };
  if (limit.maxStep === 0) {
    return { value: '0', note: limit.limitingPole ? `no stable step: pole ${formatComplex(limit.limitingPole[0], limit.limitingPole[1])}` : undefined };
  }
  return {
    value: formatTime(limit.maxStep, timeBase),
    note: limit.limitingPole ? `set by the pole ${formatComplex(limit.limitingPole[0], limit.limitingPole[1])}` : undefined,
  };
}

const MAX_DC_ENTRIES = 24;

export function AnalysisFigures({ analysis: a, timeBase }: { analysis: AnalysisRecord; timeBase: string }) {
  const density = a.nonzerosA / (a.states * a.states);
  const euler = stepText(a.stepLimits.forwardEuler, timeBase);
  const rk4 = stepText(a.stepLimits.rk4, timeBase);
  const slowest = a.slowestDecayRate ? formatTime(1 / a.slowestDecayRate, timeBase) : '—';
  const fastest = a.fastestDecayRate ? formatTime(1 / a.fastestDecayRate, timeBase) : '—';
  return (
    <div className="grid gap-4 lg:grid-cols-2" data-testid="analysis-figures">
      <div className="panel p-4">
        <table className="w-full border-collapse text-sm">
          <caption className="pb-2 text-left text-sm font-medium">Dimensions and spectrum</caption>
          <tbody>
            <Row label="States, inputs, outputs" value={`${a.states}, ${a.inputs}, ${a.outputs}`} testId="figure-dimensions" />
            <Row label="Nonzeros of A" value={`${a.nonzerosA}`} note={`${formatPercent(density)} dense`} />
            <Row
              label="Poles: stable, marginal, unstable"
              value={`${a.stablePoles}, ${a.marginalPoles}, ${a.unstablePoles}`}
              note={a.stable ? 'stable' : 'marginal and unstable poles are kept exactly by every reduction'}
            />
            <Row label="Stiffness ratio" value={a.stiffnessRatio === null ? '—' : formatNumber(a.stiffnessRatio)} note="fastest over slowest decay rate" testId="figure-stiffness" />
            <Row label="Time constants, slowest and fastest" value={`${slowest} … ${fastest}`} />
            <Row label="Largest stable step, forward Euler" value={euler.value} note={euler.note} />
            <Row label="Largest stable step, RK4" value={rk4.value} note={rk4.note} />
          </tbody>
        </table>
      </div>
      <div className="panel p-4">
        <table className="w-full border-collapse text-sm">
          <caption className="pb-2 text-left text-sm font-medium">Norms and DC gain</caption>
          <tbody>
            <Row
              label="H∞ norm ‖G‖∞"
              value={a.hInfinityNorm.finite ? formatNumber(a.hInfinityNorm.value) : '—'}
              note={
                a.hInfinityNorm.finite
                  ? a.hInfinityNorm.peakFrequency === null
                    ? 'peak as ω → ∞'
                    : `peak at ${formatFrequency(a.hInfinityNorm.peakFrequency, timeBase)}`
                  : a.hInfinityNorm.reason
              }
            />
            {!a.stable && a.stablePartHInfinityNorm !== null ? <Row label="H∞ norm of the stable part" value={formatNumber(a.stablePartHInfinityNorm)} note="the scale of relative errors" /> : null}
            <Row label="H2 norm ‖G‖2" value={a.h2Norm.finite ? formatNumber(a.h2Norm.value) : '—'} note={a.h2Norm.finite ? undefined : a.h2Norm.reason} />
            <Row
              label="Modal dominance"
              value={a.modalDominanceReliable ? 'reliable' : 'not reliable'}
              note={a.eigenvectorCondition === null ? undefined : `eigenvector condition ${formatNumber(a.eigenvectorCondition)}`}
            />
          </tbody>
        </table>
        <div className="mt-3 text-sm">
          <p className="font-medium">DC gain G(0)</p>
          {a.zeroFrequencyGain.defined ? (
            a.inputs * a.outputs <= MAX_DC_ENTRIES ? (
              <table className="num mt-1 border-collapse text-xs" data-testid="dc-gain">
                <tbody>
                  {a.zeroFrequencyGain.value.map((row, i) => (
                    <tr key={i}>
                      {row.map((v, j) => (
                        <td key={j} className="border border-rule px-2 py-0.5 text-right">
                          {formatNumber(v)}
                        </td>
                      ))}
                    </tr>
                  ))}
                </tbody>
              </table>
            ) : (
              <p className="num text-xs">
                {a.outputs}×{a.inputs} matrix; largest entry {formatNumber(Math.max(...a.zeroFrequencyGain.value.flat().map(Math.abs)))}
              </p>
            )
          ) : (
            <p className="text-xs text-graphite-soft">{a.zeroFrequencyGain.reason}</p>
          )}
        </div>
      </div>
    </div>
  );
}
