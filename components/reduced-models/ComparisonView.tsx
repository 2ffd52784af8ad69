'use client';
// Full against reduced, for one reduced-model version (issue 5, "Compare full and reduced"): Bode magnitude
// and phase of the chosen channel, the largest singular value, the error against its bound with the
// acceptance band and its verdict, step and impulse responses with their error, the response to an
// uploaded input signal, and the figures with the simulation cost. Everything is drawn from the accuracy
// report the reduction job stored; the input signal is a job of its own.
import { useMemo, useState } from 'react';
import { BodeChart } from '@/components/charts/BodeChart';
import { ChannelPicker } from '@/components/charts/ChannelPicker';
import { ErrorBoundChart } from '@/components/charts/ErrorBoundChart';
import { SingularValueChart } from '@/components/charts/SingularValueChart';
import { TimeResponseChart } from '@/components/charts/TimeResponseChart';
import { channelLabel, signalNames, type Channel } from '@/components/charts/channel-names';
import { formatCount, formatFactor, formatFrequency, formatNumber, formatTime, formatWallTime } from '@/lib/format';
import { FiguresTable } from '@/components/workspace/FiguresTable';
import type { AccuracyFigures } from '@/components/workspace/figures-rows';
import type { AccuracyFiguresRecord, CostRowRecord, ReductionCurves } from '@/lib/engine-tasks/records';
import type { JobView } from '@/lib/jobs/jobs';
import type { StoredAcceptance } from '@/lib/acceptance';
import { InputSignalPanel } from './InputSignalPanel';

export interface ComparisonViewProps {
  reducedVersionId: string;
  figures: AccuracyFiguresRecord;
  curves: ReductionCurves;
  /** the stored acceptance verdict with its band (lib/acceptance.ts); null when the recipe set none */
  acceptance: StoredAcceptance | null;
  timeBase: string;
  inputLabels: string[] | null;
  outputLabels: string[] | null;
  responseJob: JobView | null;
  canUploadSignal: boolean;
}

export function toFiguresTable(f: AccuracyFiguresRecord, timeBase = 's'): AccuracyFigures {
  const fl = f.frequencyLimited ?? null;
  return {
    fullOrder: f.fullOrder,
    reducedOrder: f.reducedOrder,
    hInfinityError: f.hInfinityError,
    hInfinityErrorRelative: f.hInfinityErrorRelative,
    errorBound: f.errorBound,
    h2Error: f.h2Error,
    zeroFrequencyGainError: f.zeroFrequencyGainError,
    peakStepError: f.peakStepError,
    stiffnessRatioFull: f.stiffnessRatioFull,
    stiffnessRatioReduced: f.stiffnessRatioReduced,
    ...(f.simulation ? { simulation: f.simulation } : {}),
    ...(f.errorBoundNote ? { errorBoundNote: f.errorBoundNote } : {}),
    // The stability flag is shown for the method that does not guarantee it (and wherever a report says no).
    ...(fl || f.reducedStable === false ? { reducedStable: f.reducedStable ?? fl?.reducedStable } : {}),
    ...(fl
      ? {
          bandErrors: {
            minFrequency: fl.band.minFrequency,
            maxFrequency: fl.band.maxFrequency,
            inBand: fl.inBandError,
            inBandAt: fl.inBandErrorFrequency,
            outOfBand: fl.outOfBandError,
            outOfBandAt: fl.outOfBandErrorFrequency,
            timeBase,
          },
        }
      : {}),
  };
}

function CostRows({ rows, input, tEnd, timeBase }: { rows: CostRowRecord[]; input: string; tEnd: number; timeBase: string }) {
  return (
    <div className="panel p-4" data-testid="cost-rows">
      <table className="w-full border-collapse text-sm">
        <caption className="pb-2 text-left text-sm font-medium">
          Each solver on both models: {input}, 0 to {formatTime(tEnd, timeBase)}
        </caption>
        <thead>
          <tr className="border-b border-rule-strong">
            {['Solver', 'Steps, full', 'Steps, reduced', 'Wall time, full', 'Wall time, reduced', 'Full ÷ reduced (time)', 'Largest output difference'].map((h) => (
              <th key={h} scope="col" className="py-1.5 pr-3 text-left font-medium">
                {h}
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          {rows.map((r) => (
            <tr key={r.solver} className="border-b border-rule last:border-b-0">
              <th scope="row" className="py-1.5 pr-3 text-left font-normal">
                {r.solver}
              </th>
              <td className="num py-1.5 pr-3">{r.full ? formatCount(r.full.steps) : '—'}</td>
              <td className="num py-1.5 pr-3">{formatCount(r.reduced.steps)}</td>
              <td className="num py-1.5 pr-3">{r.full ? formatWallTime(r.full.wallMs) : '—'}</td>
              <td className="num py-1.5 pr-3">{formatWallTime(r.reduced.wallMs)}</td>
              <td className="num py-1.5 pr-3">{r.full && r.reduced.wallMs > 0 ? formatFactor(r.full.wallMs / r.reduced.wallMs) : '—'}</td>
              <td className="num py-1.5 pr-3">{r.maxOutputDifference === null ? '—' : formatNumber(r.maxOutputDifference)}</td>
            </tr>
          ))}
        </tbody>
      </table>
      {rows
        .filter((r) => r.skippedFull)
        .map((r) => (
          <p key={r.solver} className="mt-2 text-xs text-graphite-soft">
            Full model, {r.solver} solver: {r.skippedFull}.
          </p>
        ))}
    </div>
  );
}

/** Frequency-limited balanced truncation: the measured errors in and out of its band, no bound, and stability. */
function BandErrorSummary({ figures, timeBase }: { figures: AccuracyFiguresRecord; timeBase: string }) {
  const fl = figures.frequencyLimited!;
  return (
    <div className="panel p-4 text-sm" data-testid="band-errors">
      <p>
        Balanced on the band {formatNumber(fl.band.minFrequency)}–{formatFrequency(fl.band.maxFrequency, timeBase)}. Measured σmax(G − Gr): inside the band{' '}
        <span className="num">{formatNumber(fl.inBandError)}</span>
        {fl.inBandErrorFrequency !== null ? <> (largest at {formatFrequency(fl.inBandErrorFrequency, timeBase)})</> : null}, outside it{' '}
        <span className="num">{formatNumber(fl.outOfBandError)}</span>
        {fl.outOfBandErrorFrequency !== null ? <> (largest at {formatFrequency(fl.outOfBandErrorFrequency, timeBase)})</> : null}.
      </p>
      <p className="mt-1">
        No a-priori error bound for this method: these errors are measured on frequency grids, not guaranteed between their points.
      </p>
      <p className={`mt-1 ${fl.reducedStable ? '' : 'font-semibold text-okabe-vermillion'}`} data-testid="reduced-stable">
        Reduced model stable: {fl.reducedStable ? 'yes' : 'no: it has poles in the closed right half-plane (the method does not guarantee stability)'}.
      </p>
    </div>
  );
}

export function ComparisonView(p: ComparisonViewProps) {
  const { curves, figures, timeBase } = p;
  const inputs = curves.frequency.full.re[0]?.length ?? 0;
  const outputs = curves.frequency.full.re.length;
  const [channel, setChannel] = useState<Channel>({ input: 0, output: 0 });
  const inputLabels = signalNames(p.inputLabels ?? undefined, inputs, 'u');
  const outputLabels = signalNames(p.outputLabels ?? undefined, outputs, 'y');
  const label = channelLabel(inputLabels, outputLabels, channel);
  const { input: j, output: i } = channel;
  const f = curves.frequency;
  const bode = useMemo(
    () => ({
      full: { re: f.full.re[i][j], im: f.full.im[i][j] },
      reduced: { re: f.reduced.re[i][j], im: f.reduced.im[i][j] },
    }),
    [f, i, j],
  );
  const series = (c: ReductionCurves['step'], which: 'full' | 'reduced') => ({ t: c.t, y: c[which][j][i] });

  return (
    <div className="space-y-6">
      <div className="flex flex-wrap items-end justify-between gap-4">
        <ChannelPicker inputCount={inputs} outputCount={outputs} inputLabels={p.inputLabels ?? undefined} outputLabels={p.outputLabels ?? undefined} value={channel} onChange={setChannel} />
        <p className="text-xs text-graphite-soft">Full model solid graphite, reduced model dashed teal.</p>
      </div>
      <div className="grid gap-6 xl:grid-cols-2">
        <BodeChart frequencies={f.frequencies} full={bode.full} reduced={bode.reduced} timeBase={timeBase} channelLabel={label} title="Bode plot" />
        <div className="space-y-6">
          <SingularValueChart frequencies={f.frequencies} full={f.sigmaFull} reduced={f.sigmaReduced} timeBase={timeBase} title="Largest singular value σmax(G(jω))" />
          <ErrorBoundChart
            frequencies={f.frequencies}
            error={f.error}
            bound={figures.errorBound ?? undefined}
            errorLabel="σmax(G − Gr)"
            boundLabel={figures.method === 'modal' ? 'modal bound Σ‖cᵢbᵢᵀ‖/|Re λᵢ|' : 'bound 2Σσ(r+1..n)'}
            acceptance={p.acceptance ?? undefined}
            timeBase={timeBase}
            title={figures.errorBoundNote ? `Error |G − Gr| (${figures.errorBoundNote})` : 'Error |G − Gr| against its bound'}
          />
          {figures.frequencyLimited ? <BandErrorSummary figures={figures} timeBase={timeBase} /> : null}
        </div>
      </div>
      {curves.step.full.length > 0 ? (
        <>
          <div className="grid gap-6 xl:grid-cols-2">
            <TimeResponseChart kind="step" full={series(curves.step, 'full')} reduced={series(curves.step, 'reduced')} timeBase={timeBase} channelLabel={label} />
            <TimeResponseChart kind="impulse" full={series(curves.impulse, 'full')} reduced={series(curves.impulse, 'reduced')} timeBase={timeBase} channelLabel={label} />
          </div>
          <p className="text-xs text-graphite-soft">
            Responses from rest to a unit step and a unit impulse on input {inputLabels[j]}, over {formatTime(figures.simulationEnd, timeBase)}; solvers: full {curves.step.solverFull},
            reduced {curves.step.solverReduced}.
          </p>
          <InputSignalPanel
            reducedVersionId={p.reducedVersionId}
            initialJob={p.responseJob}
            canUpload={p.canUploadSignal}
            channel={channel}
            channelLabel={label}
            inputCount={inputs}
            timeBase={timeBase}
          />
        </>
      ) : (
        // The large-model path: the full model's frequency response comes from sparse solves, its time responses are not computed.
        <p className="panel p-4 text-sm" data-testid="full-time-note">
          {figures.fullTimeResponseNote ?? 'The full model’s time responses were not computed.'} Responses to an uploaded input are not offered for this model either.
        </p>
      )}
      <div className="grid gap-6 xl:grid-cols-2">
        <div>
          <FiguresTable figures={toFiguresTable(figures, timeBase)} caption="Accuracy report" />
          {figures.path === 'sparse' ? (
            <p className="mt-2 text-xs text-graphite-soft" data-testid="estimated-figures">
              Large-model path, estimated: {(figures.estimated ?? []).join(', ') || 'none'} (the H∞ error is the largest of the sampled errors, a lower bound; the H2 error is
              not computed). The DC-gain error is exact.
            </p>
          ) : null}
        </div>
        {figures.costRows.length > 0 ? (
          <CostRows rows={figures.costRows} input={figures.simulationInput} tEnd={figures.simulationEnd} timeBase={timeBase} />
        ) : (
          <p className="panel p-4 text-sm text-graphite-soft">Simulation cost: {figures.simulationInput}.</p>
        )}
      </div>
      {figures.notes.length ? (
        <ul className="list-disc pl-5 text-sm" aria-label="Notes from the reduction">
          {figures.notes.map((n) => (
            <li key={n}>{n}</li>
          ))}
        </ul>
      ) : null}
    </div>
  );
}
