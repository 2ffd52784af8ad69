'use client';
// The optional response to an uploaded input signal: a CSV with time in the first column and one column
// per input (held between samples), sent to /api/uploads/input-signals; the response job simulates both
// models and the chart shows the chosen output, full against reduced, with the error.
import { useId, useState, type FormEvent } from 'react';
import { TimeResponseChart } from '@/components/charts/TimeResponseChart';
import type { Channel } from '@/components/charts/channel-names';
import { formatWallTime } from '@/lib/format';
import type { InputResponseRecord } from '@/lib/engine-tasks/records';
import type { JobView } from '@/lib/jobs/jobs';
import { JobProgress } from '@/components/source-models/JobProgress';

export function InputSignalPanel({
  reducedVersionId,
  initialJob,
  canUpload,
  channel,
  channelLabel,
  inputCount,
  timeBase,
}: {
  reducedVersionId: string;
  initialJob: JobView | null;
  canUpload: boolean;
  channel: Channel;
  channelLabel: string;
  inputCount: number;
  timeBase: string;
}) {
  const id = useId();
  const [job, setJob] = useState<JobView | null>(initialJob);
  const [result, setResult] = useState<InputResponseRecord | null>(
    initialJob?.status === 'succeeded' ? (initialJob.result as unknown as InputResponseRecord) : null,
  );
  const [error, setError] = useState<string | null>(null);
  const [sending, setSending] = useState(false);

  const onSubmit = async (e: FormEvent<HTMLFormElement>) => {
    e.preventDefault();
    setError(null);
    setSending(true);
    try {
      const response = await fetch('/api/uploads/input-signals', { method: 'POST', body: new FormData(e.currentTarget), credentials: 'same-origin' });
      const body = await response.json().catch(() => null);
      if (response.status !== 202) {
        setError(body?.error?.message ?? `The server answered ${response.status}.`);
        return;
      }
      setResult(null);
      setJob(body.job as JobView);
    } catch (err) {
      setError(err instanceof Error ? err.message : String(err));
    } finally {
      setSending(false);
    }
  };

  return (
    <section aria-label="Response to an input signal" className="space-y-3">
      <h2 className="text-base font-semibold">Response to an input signal</h2>
      {canUpload ? (
        <form onSubmit={onSubmit} className="panel flex flex-wrap items-end gap-4 p-4" aria-label="Input signal">
          <input type="hidden" name="reducedVersionId" value={reducedVersionId} />
          <div className="min-w-72 flex-1">
            <label htmlFor={`${id}-signal`} className="field-label">
              Input signal (CSV: time, then {inputCount} column{inputCount === 1 ? '' : 's'}, one per input)
            </label>
            <input id={`${id}-signal`} name="signal" type="file" accept=".csv,text/csv" required className="field-input" aria-invalid={error ? true : undefined} />
            {error ? (
              <p role="alert" className="mt-1 text-sm text-okabe-vermillion" data-testid="error-signal">
                {error}
              </p>
            ) : null}
          </div>
          <button type="submit" className="button-quiet" disabled={sending}>
            {sending ? 'Sending…' : 'Simulate both models'}
          </button>
        </form>
      ) : (
        <p className="text-sm text-graphite-soft">Engineers and reviewers can upload an input signal to compare the responses.</p>
      )}
      {job && !result ? (
        <JobProgress
          key={job.id}
          initial={job}
          label="Input-signal response"
          canRetry={canUpload}
          onSucceeded={(done) => setResult(done.result as unknown as InputResponseRecord)}
        />
      ) : null}
      {result ? (
        <>
          <TimeResponseChart
            kind="input"
            full={{ t: result.t, y: result.full[channel.output] }}
            reduced={{ t: result.t, y: result.reduced[channel.output] }}
            timeBase={timeBase}
            channelLabel={channelLabel.split(' → ')[1]}
          />
          <p className="text-xs text-graphite-soft">
            {result.description}; full model {result.solverFull} ({formatWallTime(result.wallMsFull)}), reduced {result.solverReduced} ({formatWallTime(result.wallMsReduced)}).
          </p>
        </>
      ) : null}
    </section>
  );
}
