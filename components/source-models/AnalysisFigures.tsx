/**
 * The analysis of a source version in figures: dimensions and sparsity, the stability split, stiffness and
 * the largest stable explicit steps, norms and the DC gain. No client state; renders on the server.
 *
 * A model analysed on the large-model path (analysis.path 'sparse') has only some of its poles and Hankel
 * singular values computed: every figure is then labelled exact or estimated, as the engine listed it
 * (analysis.sparse.estimated), with how it was obtained, and the low-rank gramians' residual is shown.
 */
import { formatComplex, formatCount, formatFrequency, formatNumber, formatPercent, formatTime } from '@/lib/format';
import type { AnalysisRecord, SparseAnalysisRecord, StepLimitRecord } from '@/lib/engine-tasks/records';

type Basis = 'exact' | 'estimated';

function BasisTag({ basis }: { basis: Basis }) {
  return (
    <span
      className={`mr-1 inline-block rounded-sm border px-1 text-[0.7rem] uppercase tracking-wide ${basis === 'exact' ? 'border-teal text-teal' : 'border-okabe-orange text-graphite'}`}
      data-testid="figure-basis"
    >
      {basis}
    </span>
  );
}

function Row({ label, value, note, testId, basis }: { label: string; value: string; note?: string; testId?: string; basis?: Basis }) {
  return (
    <tr className="border-b border-rule last:border-b-0">
      <th scope="row" className="py-1.5 pr-4 text-left font-normal text-graphite-soft">
        {label}
      </th>
      <td className="num py-1.5 text-right whitespace-nowrap" data-testid={testId}>
        {value}
      </td>
      <td className="py-1.5 pl-3 text-xs text-graphite-soft">
        {basis ? <BasisTag basis={basis} /> : null}
        {note ?? ''}
      </td>
    </tr>
  );
}

/** Exact or estimated, for a figure of a large-model analysis (none for the dense path, where every figure is computed in full). */
function basisOf(sparse: SparseAnalysisRecord | undefined, key: string): Basis | undefined {
  if (!sparse) return undefined;
  return sparse.estimated.includes(key) ? 'estimated' : 'exact';
}

/** The large-model path's own panel: what was computed and how accurately. */
function SparsePanel({ a, sparse }: { a: AnalysisRecord; sparse: SparseAnalysisRecord }) {
  const g = sparse.gramianResidual;
  const side = (name: string, f: SparseAnalysisRecord['gramianResidual']['controllability']) =>
    f ? `${name}: ${formatNumber(f.residual)} after ${f.iterations} ADI steps (${f.factorColumns} columns)${f.converged ? '' : ', not converged'}` : `${name}: not computed`;
  return (
    <div className="panel p-4 text-sm lg:col-span-2" data-testid="sparse-analysis">
      <p className="font-medium">Large-model path: {a.states.toLocaleString('en-US')} states analysed without a dense matrix</p>
      <p className="mt-1 text-xs text-graphite-soft">
        Figures marked <BasisTag basis="exact" /> are computed in full (to rounding); those marked <BasisTag basis="estimated" /> come from the
        poles, Hankel singular values and frequencies that were computed, as each note says. {sparse.descriptor ? 'Descriptor form E ẋ = A x + B u. ' : ''}
      </p>
      <table className="mt-2 w-full border-collapse text-sm">
        <tbody>
          <Row label="Poles computed" value={`${a.poles.re.length} of ${formatCount(a.states)}`} note={sparse.notes.poles} basis="estimated" testId="figure-poles-computed" />
          <Row
            label="Hankel singular values resolved"
            value={`${sparse.hsvResolved}`}
            note={sparse.notes.hankelSingularValues}
            basis="estimated"
            testId="figure-hsv-resolved"
          />
          <Row
            label="Gramian residual ‖W‖²/‖B‖²"
            value={`${formatNumber(Math.max(g.controllability?.residual ?? 0, g.observability?.residual ?? 0))}`}
            note={`${side('controllability', g.controllability)}; ${side('observability', g.observability)}; tolerance ${formatNumber(g.tolerance)}`}
            testId="figure-gramian-residual"
          />
          <Row
            label="Fastest pole"
            value={formatComplex(sparse.fastestPole.re, sparse.fastestPole.im)}
            note={`Krylov–Schur on E⁻¹A, residual ${sparse.fastestPole.residual === null ? '—' : formatNumber(sparse.fastestPole.residual)}${sparse.fastestPole.converged ? '' : ', not converged'}`}
            basis="estimated"
          />
        </tbody>
      </table>
    </div>
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
  const sparse = a.path === 'sparse' ? a.sparse : undefined;
  const b = (key: string) => basisOf(sparse, key);
  const why = (key: string) => sparse?.notes[key];
  const euler = stepText(a.stepLimits.forwardEuler, timeBase);
  const rk4 = stepText(a.stepLimits.rk4, timeBase);
  const slowest = a.slowestDecayRate ? formatTime(1 / a.slowestDecayRate, timeBase) : '—';
  const fastest = a.fastestDecayRate ? formatTime(1 / a.fastestDecayRate, timeBase) : '—';
  return (
    <div className="grid gap-4 lg:grid-cols-2" data-testid="analysis-figures">
      {sparse ? <SparsePanel a={a} sparse={sparse} /> : null}
      <div className="panel p-4">
        <table className="w-full border-collapse text-sm">
          <caption className="pb-2 text-left text-sm font-medium">Dimensions and spectrum</caption>
          <tbody>
            <Row label="States, inputs, outputs" value={`${a.states}, ${a.inputs}, ${a.outputs}`} testId="figure-dimensions" basis={b('states')} />
            <Row label="Nonzeros of A" value={`${a.nonzerosA}`} note={`${formatPercent(density)} dense`} basis={b('nonzerosA')} />
            <Row
              label={sparse ? 'Computed poles: stable, marginal, unstable' : 'Poles: stable, marginal, unstable'}
              value={`${a.stablePoles}, ${a.marginalPoles}, ${a.unstablePoles}`}
              note={sparse ? why('stable') : a.stable ? 'stable' : 'marginal and unstable poles are kept exactly by every reduction'}
              basis={b('stablePoles')}
            />
            <Row
              label="Stiffness ratio"
              value={a.stiffnessRatio === null ? '—' : formatNumber(a.stiffnessRatio)}
              note={why('stiffnessRatio') ?? 'fastest over slowest decay rate'}
              testId="figure-stiffness"
              basis={b('stiffnessRatio')}
            />
            <Row label="Time constants, slowest and fastest" value={`${slowest} … ${fastest}`} basis={b('slowestDecayRate')} />
            <Row label="Largest stable step, forward Euler" value={euler.value} note={sparse ? `${euler.note ?? ''}; ${why('stepLimits')}` : euler.note} basis={b('stepLimits')} />
            <Row label="Largest stable step, RK4" value={rk4.value} note={rk4.note} basis={b('stepLimits')} />
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
                  ? `${a.hInfinityNorm.peakFrequency === null ? 'peak as ω → ∞' : `peak at ${formatFrequency(a.hInfinityNorm.peakFrequency, timeBase)}`}${sparse ? `; ${why('hInfinityNorm')}` : ''}`
                  : a.hInfinityNorm.reason
              }
              basis={b('hInfinityNorm')}
              testId="figure-h-infinity"
            />
            {!a.stable && a.stablePartHInfinityNorm !== null && !sparse ? (
              <Row label="H∞ norm of the stable part" value={formatNumber(a.stablePartHInfinityNorm)} note="the scale of relative errors" />
            ) : null}
            <Row
              label="H2 norm ‖G‖2"
              value={a.h2Norm.finite ? formatNumber(a.h2Norm.value) : '—'}
              note={a.h2Norm.finite ? why('h2Norm') : a.h2Norm.reason}
              basis={b('h2Norm')}
            />
            {sparse ? (
              <Row label="Largest Hankel singular value σ₁" value={a.hankelSingularValues.length ? formatNumber(a.hankelSingularValues[0]) : '—'} note={why('hankelSingularValues')} basis="estimated" />
            ) : null}
            <Row
              label="Modal dominance"
              value={a.modalDominanceReliable ? 'reliable' : 'not reliable'}
              note={sparse ? why('modes') : a.eigenvectorCondition === null ? undefined : `eigenvector condition ${formatNumber(a.eigenvectorCondition)}`}
              basis={b('modes')}
            />
          </tbody>
        </table>
        <div className="mt-3 text-sm">
          <p className="font-medium">
            DC gain G(0) {sparse ? <BasisTag basis={b('zeroFrequencyGain')!} /> : null}
            {sparse ? <span className="text-xs font-normal text-graphite-soft">{why('zeroFrequencyGain')}</span> : null}
          </p>
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
