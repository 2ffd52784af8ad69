'use client';
// The recipe form (a recipe is one reduction run's settings): method, modal selection rule and band, order by number (the
// order slider, with the figures of each order read from the analysis) or by tolerance, an optional
// acceptance band, and where the result goes (a new reduced model, or the next version of one). Running
// it posts to /api/reductions and follows the reduction job until its draft version exists.
//
// Frequency-limited balanced truncation (Gawronski & Juang 1990) takes the band to balance on, in rad per
// model time unit or in Hz, checked beside its fields as the server checks it; its order is by number only
// (no a-priori bound, so the slider has no bound column). Arriving from a controller project with an
// acceptance band (?project=slug), the band and the acceptance check start from the project's.
import { useRouter } from 'next/navigation';
import { useEffect, useId, useMemo, useState, type FormEvent } from 'react';
import { useMutation, useQuery } from '@tanstack/react-query';
import { apiFetch, ApiClientError } from '@/components/api-client';
import { formatFrequency, formatNumber, frequencyUnit } from '@/lib/format';
import { OrderSlider } from '@/components/workspace/OrderSlider';
import type { AnalysisRecord, OrderFigureTable } from '@/lib/engine-tasks/records';
import type { JobView } from '@/lib/jobs/jobs';
import { JobProgress } from './JobProgress';
import { checkLimitedBand, orderForTolerance, storedTable, suggestedOrder, type BandUnit, type Method, type ModalSelection } from './recipe-choices';
import { METHOD_NAMES, methodChoiceLabel } from '@/lib/recipe-words';

export interface ReducedModelChoice {
  id: string;
  name: string;
  latestVersion: number;
}

/** A controller project's acceptance band, already in rad per the model's time unit. */
export interface ProjectBandSeed {
  projectName: string;
  projectSlug: string;
  minFrequency: number;
  maxFrequency: number;
  /** the largest error the project accepts in its band, when it says */
  maxError: number | null;
}

export interface RecipeFormProps {
  analysis: AnalysisRecord;
  /** seconds in one model time unit, when known (Hz can then be converted); null otherwise */
  timeBaseSeconds: number | null;
  /** the controller project the person came from, when it has an acceptance band */
  seed?: ProjectBandSeed | null;
  sourceVersionId: string;
  sourceName: string;
  versionNumber: number;
  timeBase: string;
  canRun: boolean;
  reducedModels: ReducedModelChoice[];
  method: Method;
  onMethod: (m: Method) => void;
  selection: ModalSelection;
  onSelection: (s: ModalSelection) => void;
  order: number;
  onOrder: (r: number) => void;
}

const METHODS: readonly Method[] = ['balanced', 'residualization', 'modal', 'frequency-limited'];

/** Shown instead of the bound column, and on the result page. */
export const NO_BOUND_SENTENCE =
  'Frequency-limited balanced truncation has no a-priori error bound: the error inside and outside the band is measured once the reduction has run, and the reduced model may even be unstable (its stability is reported).';

const shortNumber = (x: number) => String(Number(x.toPrecision(6)));

function num(text: string): number | undefined {
  const t = text.trim();
  if (t === '') return undefined;
  const v = Number(t);
  return Number.isFinite(v) ? v : NaN;
}

export function RecipeForm(p: RecipeFormProps) {
  const { analysis, method, selection, order, timeBase } = p;
  const router = useRouter();
  const id = useId();
  const [orderRule, setOrderRule] = useState<'order' | 'tolerance'>('order');
  const seed = p.seed ?? null;
  const [flLo, setFlLo] = useState(seed ? shortNumber(seed.minFrequency) : '');
  const [flHi, setFlHi] = useState(seed ? shortNumber(seed.maxFrequency) : '');
  const [flUnit, setFlUnit] = useState<BandUnit>('rad');
  const [tolerance, setTolerance] = useState('1e-3');
  const [bandLo, setBandLo] = useState('');
  const [bandHi, setBandHi] = useState('');
  const seedAcceptance = seed !== null && seed.maxError !== null && seed.minFrequency > 0;
  const [withAcceptance, setWithAcceptance] = useState(seedAcceptance);
  const [accLo, setAccLo] = useState(seedAcceptance ? shortNumber(seed.minFrequency) : '');
  const [accHi, setAccHi] = useState(seedAcceptance ? shortNumber(seed.maxFrequency) : '');
  const [accMax, setAccMax] = useState(seedAcceptance ? shortNumber(seed.maxError!) : '');
  const [target, setTarget] = useState<'new' | string>(p.reducedModels.length ? p.reducedModels[0].id : 'new');
  const [name, setName] = useState(`${p.sourceName}, reduced`);
  const [description, setDescription] = useState('');
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [job, setJob] = useState<JobView | null>(null);

  const band = useMemo(() => {
    const lo = num(bandLo);
    const hi = num(bandHi);
    return lo !== undefined && hi !== undefined && lo > 0 && hi > lo ? ([lo, hi] as [number, number]) : null;
  }, [bandLo, bandHi]);
  const bandQuery = useQuery({
    queryKey: ['modal-band-figures', p.sourceVersionId, band],
    enabled: method === 'modal' && selection === 'band' && band !== null,
    queryFn: () =>
      apiFetch<{ figures: OrderFigureTable; statesInBand: number }>(
        `/api/source-versions/${p.sourceVersionId}/modal-figures?minFrequency=${band![0]}&maxFrequency=${band![1]}`,
      ),
  });

  const table: OrderFigureTable | null = storedTable(analysis, method, selection) ?? bandQuery.data?.figures ?? null;
  const available = table?.available ? table : null;

  // A change of method or rule keeps the order when the new table allows it, else picks a sensible one.
  useEffect(() => {
    if (!available) return;
    if (!available.orders.includes(order)) {
      const inBand = bandQuery.data?.statesInBand;
      const wanted = method === 'modal' && selection === 'band' && inBand ? inBand : suggestedOrder(available, analysis.stablePartHInfinityNorm);
      const nearest = available.orders.reduce((a, b) => (Math.abs(b - wanted) < Math.abs(a - wanted) ? b : a), available.orders[0]);
      p.onOrder(nearest);
    }
    // p.onOrder is a state setter; the effect runs when the table changes.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [available, bandQuery.data]);

  const toleranceValue = num(tolerance);
  const byTolerance = available && toleranceValue ? orderForTolerance(available, toleranceValue, analysis.stablePartHInfinityNorm) : null;

  const run = useMutation({
    mutationFn: (body: unknown) => apiFetch<{ job: JobView }>('/api/reductions', { method: 'POST', body }),
    onSuccess: ({ job: queued }) => setJob(queued),
    onError: (err: Error) => {
      if (err instanceof ApiClientError && err.field) setErrors({ [err.field]: err.message });
      else setErrors({ form: err.message });
    },
  });

  const onSubmit = (e: FormEvent) => {
    e.preventDefault();
    const found: Record<string, string> = {};
    const limited = method === 'frequency-limited';
    const rule = limited ? 'order' : orderRule;
    const recipe: Record<string, unknown> = { method, orderRule: rule, modalSelection: selection };
    if (limited) {
      const checked = checkLimitedBand(flLo, flHi, flUnit, p.timeBaseSeconds !== null);
      if (!checked.ok) found[checked.field] = checked.message;
      else recipe.limitedBand = checked.band;
    }
    if (rule === 'order') recipe.order = order;
    else if (!(toleranceValue! > 0)) found['recipe.tolerance'] = 'Give a positive tolerance, e.g. 1e-3.';
    else recipe.tolerance = toleranceValue;
    if (method === 'modal' && selection === 'band') {
      if (!band) found['recipe.band'] = 'Give the band as two frequencies, the lower first.';
      else recipe.band = { minFrequency: band[0], maxFrequency: band[1] };
    }
    if (withAcceptance) {
      const lo = num(accLo);
      const hi = num(accHi);
      const max = num(accMax);
      if (!(lo! > 0 && hi! > lo!)) found['recipe.acceptance.maxFrequency'] = 'Give the band as two positive frequencies, the lower first.';
      else if (!(max! > 0)) found['recipe.acceptance.maxError'] = 'Give the largest error allowed in the band (a positive gain).';
      else recipe.acceptance = { minFrequency: lo, maxFrequency: hi, maxError: max };
    }
    if (target === 'new' && name.trim() === '') found['target.name'] = 'Name the reduced model.';
    setErrors(found);
    if (Object.keys(found).length > 0) return;
    run.mutate({
      sourceVersionId: p.sourceVersionId,
      recipe,
      target: target === 'new' ? { kind: 'new', name: name.trim(), description: description.trim() } : { kind: 'existing', reducedModelId: target },
    });
  };

  const err = (key: string) =>
    errors[key] ? (
      <p role="alert" className="mt-1 text-sm text-okabe-vermillion" data-testid={`error-${key}`}>
        {errors[key]}
      </p>
    ) : null;

  const unit = frequencyUnit(timeBase);
  /** A message beside a band field stays until that band is edited. */
  const clearBandErrors = () =>
    setErrors((e) => Object.fromEntries(Object.entries(e).filter(([k]) => !k.startsWith('recipe.limitedBand'))));
  const hzLabel = timeBase === 's' ? 'Hz' : 'Hz (cycles per second)';
  const switchUnit = (next: BandUnit) => {
    // Keep the band the same when the unit changes: ω = 2π f · (seconds per time unit).
    const factor = p.timeBaseSeconds === null ? null : 2 * Math.PI * p.timeBaseSeconds;
    if (factor !== null && next !== flUnit) {
      const convert = (t: string) => {
        const v = Number(t.trim());
        if (t.trim() === '' || !Number.isFinite(v)) return t;
        return shortNumber(next === 'hz' ? v / factor : v * factor);
      };
      setFlLo(convert(flLo));
      setFlHi(convert(flHi));
    }
    setFlUnit(next);
    clearBandErrors();
  };
  const limited = method === 'frequency-limited';
  return (
    <form onSubmit={onSubmit} className="panel space-y-4 p-5" aria-label="Recipe" data-testid="recipe-form">
      <h2 className="text-base font-semibold">Recipe: how to reduce v{p.versionNumber}</h2>
      <div className="grid gap-4 md:grid-cols-2">
        <div>
          <label htmlFor={`${id}-method`} className="field-label">
            Method
          </label>
          <select id={`${id}-method`} className="field-input" value={method} onChange={(e) => p.onMethod(e.target.value as Method)} disabled={!p.canRun}>
            {METHODS.map((m) => (
              <option key={m} value={m}>
                {methodChoiceLabel(m)}
              </option>
            ))}
          </select>
        </div>
        {method === 'modal' ? (
          <div>
            <label htmlFor={`${id}-selection`} className="field-label">
              Modes kept first
            </label>
            <select id={`${id}-selection`} className="field-input" value={selection} onChange={(e) => p.onSelection(e.target.value as ModalSelection)} disabled={!p.canRun}>
              <option value="dominance">Most dominant (largest contribution to ‖G‖∞)</option>
              <option value="slowest">Slowest (smallest decay rate)</option>
              <option value="band">Inside a frequency band</option>
            </select>
          </div>
        ) : null}
      </div>
      {method === 'modal' && selection === 'band' ? (
        <div className="grid gap-4 md:grid-cols-2">
          <div>
            <label htmlFor={`${id}-band-lo`} className="field-label">
              Band from ({unit})
            </label>
            <input id={`${id}-band-lo`} className="field-input num" value={bandLo} onChange={(e) => setBandLo(e.target.value)} inputMode="decimal" placeholder="e.g. 1" />
          </div>
          <div>
            <label htmlFor={`${id}-band-hi`} className="field-label">
              Band to ({unit})
            </label>
            <input id={`${id}-band-hi`} className="field-input num" value={bandHi} onChange={(e) => setBandHi(e.target.value)} inputMode="decimal" placeholder="e.g. 100" />
          </div>
          {err('recipe.band')}
          {bandQuery.data ? (
            <p className="text-sm md:col-span-2">
              {bandQuery.data.statesInBand} states (with those kept exactly) have their natural frequency in the band.
            </p>
          ) : null}
        </div>
      ) : null}

      {limited ? (
        <fieldset data-testid="limited-band">
          <legend className="field-label mb-1">Band to balance on</legend>
          {seed ? (
            <p className="mb-2 text-sm" data-testid="limited-band-seed">
              Started from the acceptance band of the controller project{' '}
              <a href={`/projects/${seed.projectSlug}`}>{seed.projectName}</a>: {formatFrequency(seed.minFrequency, timeBase)} to{' '}
              {formatFrequency(seed.maxFrequency, timeBase)}.
            </p>
          ) : null}
          <div className="grid gap-4 md:grid-cols-3">
            <div>
              <label htmlFor={`${id}-fl-lo`} className="field-label">
                From
              </label>
              <input
                id={`${id}-fl-lo`}
                className="field-input num"
                value={flLo}
                onChange={(e) => {
                  setFlLo(e.target.value);
                  clearBandErrors();
                }}
                inputMode="decimal"
                placeholder="e.g. 0"
                aria-invalid={errors['recipe.limitedBand.minFrequency'] ? true : undefined}
                disabled={!p.canRun}
              />
              {err('recipe.limitedBand.minFrequency')}
            </div>
            <div>
              <label htmlFor={`${id}-fl-hi`} className="field-label">
                To
              </label>
              <input
                id={`${id}-fl-hi`}
                className="field-input num"
                value={flHi}
                onChange={(e) => {
                  setFlHi(e.target.value);
                  clearBandErrors();
                }}
                inputMode="decimal"
                placeholder="e.g. 50"
                aria-invalid={errors['recipe.limitedBand.maxFrequency'] ? true : undefined}
                disabled={!p.canRun}
              />
              {err('recipe.limitedBand.maxFrequency')}
            </div>
            <div>
              <label htmlFor={`${id}-fl-unit`} className="field-label">
                Unit
              </label>
              <select id={`${id}-fl-unit`} className="field-input" value={flUnit} onChange={(e) => switchUnit(e.target.value as BandUnit)} disabled={!p.canRun}>
                <option value="rad">{unit}</option>
                {p.timeBaseSeconds !== null ? <option value="hz">{hzLabel}</option> : null}
              </select>
              {err('recipe.limitedBand.unit')}
            </div>
          </div>
          {err('recipe.limitedBand')}
          <p className="mt-1 text-xs text-graphite-soft">
            0 ≤ from &lt; to. The gramians are restricted to the frequencies inside the band (Gawronski &amp; Juang 1990); the poles&apos; band is{' '}
            {formatFrequency(analysis.frequencyBand[0], timeBase)} to {formatFrequency(analysis.frequencyBand[1], timeBase)}.
          </p>
        </fieldset>
      ) : null}

      <fieldset>
        <legend className="field-label mb-1">Order</legend>
        {limited ? (
          <p className="mb-3 text-sm">By number of states (the method has no bound for a tolerance to meet).</p>
        ) : (
        <div role="radiogroup" aria-label="Order rule" className="mb-3 flex flex-wrap gap-4 text-sm">
          <label className="flex items-center gap-2">
            <input type="radio" name="orderRule" checked={orderRule === 'order'} onChange={() => setOrderRule('order')} />
            By number of states
          </label>
          <label className="flex items-center gap-2">
            <input type="radio" name="orderRule" checked={orderRule === 'tolerance'} onChange={() => setOrderRule('tolerance')} />
            By tolerance: smallest order whose bound is at most tolerance × ‖G‖∞
          </label>
        </div>
        )}
        {!table ? (
          <p className="text-sm text-graphite-soft">{method === 'modal' && selection === 'band' ? 'Give a band to see the orders it allows.' : 'Loading the orders…'}</p>
        ) : !table.available ? (
          <p role="alert" className="text-sm">
            {methodChoiceLabel(method)} is not available for this model: {table.reason}
          </p>
        ) : orderRule === 'order' || limited ? (
          <>
            <OrderSlider
              orders={table.orders}
              value={order}
              onChange={p.onOrder}
              figures={table.figures}
              fullOrder={analysis.states}
              timeBase={timeBase}
              disabled={!p.canRun}
              noBoundNote={limited ? `${NO_BOUND_SENTENCE} Stiffness and step limits are shown on the result page, since the reduced poles depend on the band.` : undefined}
            />
            {table.limitNote ? <p className="mt-1 text-xs text-graphite-soft">{table.limitNote}</p> : null}
            {err('recipe.order')}
          </>
        ) : (
          <div className="max-w-md">
            <label htmlFor={`${id}-tolerance`} className="field-label">
              Tolerance (relative to ‖G‖∞)
            </label>
            <input id={`${id}-tolerance`} className="field-input num" value={tolerance} onChange={(e) => setTolerance(e.target.value)} inputMode="decimal" />
            {err('recipe.tolerance')}
            <p className="mt-1 text-sm" aria-live="polite">
              {byTolerance
                ? `Order ${byTolerance.order}: bound ${formatNumber(byTolerance.bound)} ≤ ${formatNumber(toleranceValue! * (analysis.stablePartHInfinityNorm ?? 0))}`
                : 'No order on the slider meets it; the reduction will search the larger orders.'}
            </p>
          </div>
        )}
      </fieldset>

      <fieldset>
        <label className="flex items-center gap-2 text-sm">
          <input type="checkbox" checked={withAcceptance} onChange={(e) => setWithAcceptance(e.target.checked)} />
          Acceptance band: the controller team&apos;s limit on |G − Gr| over a frequency range
        </label>
        {withAcceptance ? (
          <div className="mt-2 grid gap-4 md:grid-cols-3">
            <div>
              <label htmlFor={`${id}-acc-lo`} className="field-label">
                From ({unit})
              </label>
              <input id={`${id}-acc-lo`} className="field-input num" value={accLo} onChange={(e) => setAccLo(e.target.value)} inputMode="decimal" />
            </div>
            <div>
              <label htmlFor={`${id}-acc-hi`} className="field-label">
                To ({unit})
              </label>
              <input id={`${id}-acc-hi`} className="field-input num" value={accHi} onChange={(e) => setAccHi(e.target.value)} inputMode="decimal" />
              {err('recipe.acceptance.maxFrequency')}
            </div>
            <div>
              <label htmlFor={`${id}-acc-max`} className="field-label">
                Largest error
              </label>
              <input id={`${id}-acc-max`} className="field-input num" value={accMax} onChange={(e) => setAccMax(e.target.value)} inputMode="decimal" />
              {err('recipe.acceptance.maxError')}
            </div>
            <p className="text-xs text-graphite-soft md:col-span-3">
              The poles&apos; band is {formatFrequency(analysis.frequencyBand[0], timeBase)} to {formatFrequency(analysis.frequencyBand[1], timeBase)}; the error is
              checked on a dense grid inside the band.
            </p>
          </div>
        ) : null}
      </fieldset>

      <fieldset>
        <legend className="field-label mb-1">Register the result as</legend>
        <div className="grid gap-4 md:grid-cols-2">
          <div>
            <label htmlFor={`${id}-target`} className="field-label">
              Reduced model
            </label>
            <select id={`${id}-target`} className="field-input" value={target} onChange={(e) => setTarget(e.target.value)}>
              <option value="new">A new reduced model</option>
              {p.reducedModels.map((m) => (
                <option key={m.id} value={m.id}>
                  {m.name}: next version after v{m.latestVersion}
                </option>
              ))}
            </select>
          </div>
          {target === 'new' ? (
            <div>
              <label htmlFor={`${id}-name`} className="field-label">
                Name of the new reduced model
              </label>
              <input id={`${id}-name`} className="field-input" value={name} onChange={(e) => setName(e.target.value)} maxLength={120} />
              {err('target.name')}
            </div>
          ) : null}
        </div>
        {target === 'new' ? (
          <div className="mt-3">
            <label htmlFor={`${id}-description`} className="field-label">
              What it is for
            </label>
            <input id={`${id}-description`} className="field-input" value={description} onChange={(e) => setDescription(e.target.value)} maxLength={4000} />
          </div>
        ) : null}
      </fieldset>

      {errors.form ? (
        <p role="alert" className="border-l-2 border-okabe-vermillion bg-sheet px-3 py-2 text-sm">
          {errors.form}
        </p>
      ) : null}
      {Object.entries(errors)
        .filter(
          ([k]) =>
            ![
              'form',
              'recipe.order',
              'recipe.tolerance',
              'recipe.band',
              'recipe.acceptance.maxFrequency',
              'recipe.acceptance.maxError',
              'target.name',
              'recipe.limitedBand',
              'recipe.limitedBand.minFrequency',
              'recipe.limitedBand.maxFrequency',
              'recipe.limitedBand.unit',
            ].includes(k),
        )
        .map(([k, v]) => (
          <p key={k} role="alert" className="text-sm text-okabe-vermillion">
            {v}
          </p>
        ))}

      {p.canRun ? (
        <button type="submit" className="button-primary" disabled={run.isPending || (job !== null && job.status !== 'failed') || !available}>
          {run.isPending ? 'Queuing…' : `Run ${METHOD_NAMES[method]}`}
        </button>
      ) : (
        <p className="text-sm text-graphite-soft">Only engineers run recipes; you can explore the orders here.</p>
      )}
      {job ? (
        <JobProgress
          key={job.id}
          initial={job}
          label="Reduction"
          canRetry={p.canRun}
          canCancel={p.canRun}
          onSucceeded={(done) => {
            const url = done.result?.url;
            if (typeof url === 'string') router.push(url);
          }}
        />
      ) : null}
    </form>
  );
}
