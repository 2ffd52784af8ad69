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
//
// The fields are groups on react-hook-form, validated on submit with recipe-form-schema.ts (the form's own
// checks, then the server's request schema) through @hookform/resolvers; a message stays beside its field
// until the next submit (a band's until that band is edited). Method, modal rule and order belong to the
// workspace (the charts follow them) and reach the validation as the form's context.
import { useRouter } from 'next/navigation';
import { useEffect, useId, useState, type ReactNode } from 'react';
import { FormProvider, get, useForm, useFormContext, useWatch, type FieldErrors, type Path } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { useMutation, useQuery } from '@tanstack/react-query';
import { apiFetch, ApiClientError } from '@/components/api-client';
import { formatFrequency, formatNumber, frequencyUnit } from '@/lib/format';
import { OrderSlider } from '@/components/workspace/OrderSlider';
import type { AnalysisRecord, OrderFigureTable } from '@/lib/engine-tasks/records';
import type { JobView } from '@/lib/jobs/jobs';
import type { ProjectBandSeed } from '@/lib/reduced-models/queries';
import type { ReductionRequest } from '@/lib/reduced-models/schemas';
import { JobProgress } from './JobProgress';
import { orderForTolerance, storedTable, suggestedOrder, type BandUnit, type Method, type ModalSelection } from './recipe-choices';
import { modalBand, recipeFormSchema, typedNumber, type RecipeFormContext, type RecipeFormValues } from './recipe-form-schema';
import { METHOD_NAMES, methodChoiceLabel } from '@/lib/recipe-words';

export interface ReducedModelChoice {
  id: string;
  name: string;
  latestVersion: number;
}

/** The analysed source version a recipe is for, and who is looking at it (the workspace's props). */
export interface RecipeSource {
  analysis: AnalysisRecord;
  sourceVersionId: string;
  sourceName: string;
  versionNumber: number;
  timeBase: string;
  canRun: boolean;
  reducedModels: ReducedModelChoice[];
  /** seconds in one model time unit, when known (Hz can then be converted); null otherwise */
  timeBaseSeconds: number | null;
  /** the controller project the person came from, when it has an acceptance band (rad per the model's time unit) */
  seed?: ProjectBandSeed | null;
}

export interface RecipeFormProps extends RecipeSource {
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

/** Error keys shown beside their fields; any other (a field the server names) is listed above the button. */
const FIELD_KEYS = [
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
];

const shortNumber = (x: number) => String(Number(x.toPrecision(6)));

function startingValues(p: RecipeSource): RecipeFormValues {
  const seed = p.seed ?? null;
  const seedAcceptance = seed !== null && seed.maxError !== null && seed.minFrequency > 0;
  return {
    orderRule: 'order',
    tolerance: '1e-3',
    band: { from: '', to: '' },
    limitedBand: { from: seed ? shortNumber(seed.minFrequency) : '', to: seed ? shortNumber(seed.maxFrequency) : '', unit: 'rad' },
    withAcceptance: seedAcceptance,
    acceptance: {
      from: seedAcceptance ? shortNumber(seed.minFrequency) : '',
      to: seedAcceptance ? shortNumber(seed.maxFrequency) : '',
      maxError: seedAcceptance ? shortNumber(seed.maxError!) : '',
    },
    target: p.reducedModels.length ? p.reducedModels[0].id : 'new',
    name: `${p.sourceName}, reduced`,
    description: '',
  };
}

/** Every error message with the request field it is about (nested as react-hook-form keeps them), in order. */
function errorEntries(errors: FieldErrors, prefix = ''): [string, string][] {
  return Object.entries(errors).flatMap(([key, value]): [string, string][] => {
    if (key === 'ref' || key === 'root' || value === null || typeof value !== 'object') return [];
    const path = prefix ? `${prefix}.${key}` : key;
    const node = value as { message?: unknown; type?: unknown };
    if (typeof node.message === 'string' || typeof node.type === 'string') return typeof node.message === 'string' ? [[path, node.message]] : [];
    return errorEntries(value as FieldErrors, path);
  });
}

/**
 * A text field or select of the form: register() with the current value as the element's default, so the
 * form rendered on the server shows the values too (react-hook-form sets them only once mounted).
 */
function useField() {
  const { register, getValues } = useFormContext<RecipeFormValues>();
  return (name: Path<RecipeFormValues>, options?: Parameters<typeof register>[1]) => ({ ...register(name, options), defaultValue: String(getValues(name)) });
}

/** The message under a request field, beside it. */
function FieldMessage({ field }: { field: string }) {
  const { formState } = useFormContext<RecipeFormValues>();
  const message: unknown = (get(formState.errors, field) as { message?: unknown } | undefined)?.message;
  return typeof message === 'string' && message ? (
    <p role="alert" className="mt-1 text-sm text-okabe-vermillion" data-testid={`error-${field}`}>
      {message}
    </p>
  ) : null;
}

export function RecipeForm(p: RecipeFormProps) {
  const { analysis, method, selection, order, timeBase } = p;
  const router = useRouter();
  const id = useId();
  const [job, setJob] = useState<JobView | null>(null);
  const context: RecipeFormContext = { sourceVersionId: p.sourceVersionId, method, selection, order, hzAllowed: p.timeBaseSeconds !== null };
  const form = useForm<RecipeFormValues, RecipeFormContext, ReductionRequest>({
    defaultValues: startingValues(p),
    context,
    resolver: (values, ctx, options) => zodResolver(recipeFormSchema(ctx ?? context))(values, ctx, options),
    mode: 'onSubmit',
    reValidateMode: 'onSubmit',
  });
  const { errors } = form.formState;

  const band = modalBand(useWatch({ control: form.control, name: 'band' }));
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

  const run = useMutation({
    mutationFn: (body: ReductionRequest) => apiFetch<{ job: JobView }>('/api/reductions', { method: 'POST', body }),
    onSuccess: ({ job: queued }) => setJob(queued),
    onError: (err: Error) => {
      form.clearErrors();
      if (err instanceof ApiClientError && err.field) form.setError(err.field as never, { type: 'server', message: err.message });
      else form.setError('root.server', { type: 'server', message: err.message });
    },
  });

  const limited = method === 'frequency-limited';
  const otherErrors = errorEntries(errors).filter(([key]) => !FIELD_KEYS.includes(key));
  return (
    <FormProvider {...form}>
      <form onSubmit={form.handleSubmit((body) => run.mutate(body))} className="panel space-y-4 p-5" aria-label="Recipe" data-testid="recipe-form">
        <h2 className="text-base font-semibold">Recipe: how to reduce v{p.versionNumber}</h2>
        <MethodFields id={id} {...p} />
        {method === 'modal' && selection === 'band' ? (
          <ModalBandFields id={id} timeBase={timeBase} statesInBand={bandQuery.data?.statesInBand ?? null} />
        ) : null}
        {limited ? <LimitedBandFields id={id} {...p} /> : null}
        <OrderFields id={id} {...p} table={table} />
        <AcceptanceFields id={id} analysis={analysis} timeBase={timeBase} />
        <TargetFields id={id} reducedModels={p.reducedModels} />

        {errors.root?.server?.message ? (
          <p role="alert" className="border-l-2 border-okabe-vermillion bg-sheet px-3 py-2 text-sm">
            {errors.root.server.message}
          </p>
        ) : null}
        {otherErrors.map(([key, message]) => (
          <p key={key} role="alert" className="text-sm text-okabe-vermillion">
            {message}
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
    </FormProvider>
  );
}

function Field({ htmlFor, label, children }: { htmlFor: string; label: ReactNode; children: ReactNode }) {
  return (
    <div>
      <label htmlFor={htmlFor} className="field-label">
        {label}
      </label>
      {children}
    </div>
  );
}

/** Method, and for modal truncation the rule that chooses the modes kept first (both held by the workspace). */
function MethodFields({ id, method, onMethod, selection, onSelection, canRun }: { id: string } & RecipeFormProps) {
  return (
    <div className="grid gap-4 md:grid-cols-2">
      <Field htmlFor={`${id}-method`} label="Method">
        <select id={`${id}-method`} className="field-input" value={method} onChange={(e) => onMethod(e.target.value as Method)} disabled={!canRun}>
          {METHODS.map((m) => (
            <option key={m} value={m}>
              {methodChoiceLabel(m)}
            </option>
          ))}
        </select>
      </Field>
      {method === 'modal' ? (
        <Field htmlFor={`${id}-selection`} label="Modes kept first">
          <select id={`${id}-selection`} className="field-input" value={selection} onChange={(e) => onSelection(e.target.value as ModalSelection)} disabled={!canRun}>
            <option value="dominance">Most dominant (largest contribution to ‖G‖∞)</option>
            <option value="slowest">Slowest (smallest decay rate)</option>
            <option value="band">Inside a frequency band</option>
          </select>
        </Field>
      ) : null}
    </div>
  );
}

/** Modal truncation's band rule: the band whose modes are kept. */
function ModalBandFields({ id, timeBase, statesInBand }: { id: string; timeBase: string; statesInBand: number | null }) {
  const field = useField();
  const unit = frequencyUnit(timeBase);
  return (
    <div className="grid gap-4 md:grid-cols-2">
      <Field htmlFor={`${id}-band-lo`} label={`Band from (${unit})`}>
        <input id={`${id}-band-lo`} className="field-input num" {...field('band.from')} inputMode="decimal" placeholder="e.g. 1" />
      </Field>
      <Field htmlFor={`${id}-band-hi`} label={`Band to (${unit})`}>
        <input id={`${id}-band-hi`} className="field-input num" {...field('band.to')} inputMode="decimal" placeholder="e.g. 100" />
      </Field>
      <FieldMessage field="recipe.band" />
      {statesInBand !== null ? (
        <p className="text-sm md:col-span-2">{statesInBand} states (with those kept exactly) have their natural frequency in the band.</p>
      ) : null}
    </div>
  );
}

/** Frequency-limited balanced truncation's band, in rad per model time unit or in Hz. */
function LimitedBandFields({ id, analysis, timeBase, timeBaseSeconds, seed, canRun }: { id: string } & RecipeFormProps) {
  const { setValue, getValues, clearErrors, formState } = useFormContext<RecipeFormValues>();
  const field = useField();
  const unitChosen = useWatch<RecipeFormValues, 'limitedBand.unit'>({ name: 'limitedBand.unit' });
  const unit = frequencyUnit(timeBase);
  const hzLabel = timeBase === 's' ? 'Hz' : 'Hz (cycles per second)';
  /** A message beside a band field stays until that band is edited. */
  const clearBandErrors = () => clearErrors('recipe.limitedBand' as never);
  const switchUnit = (next: BandUnit) => {
    // Keep the band the same when the unit changes: ω = 2π f · (seconds per time unit).
    const factor = timeBaseSeconds === null ? null : 2 * Math.PI * timeBaseSeconds;
    if (factor !== null && next !== unitChosen) {
      const convert = (t: string) => {
        const v = Number(t.trim());
        if (t.trim() === '' || !Number.isFinite(v)) return t;
        return shortNumber(next === 'hz' ? v / factor : v * factor);
      };
      const [from, to] = getValues(['limitedBand.from', 'limitedBand.to']);
      setValue('limitedBand.from', convert(from));
      setValue('limitedBand.to', convert(to));
    }
    setValue('limitedBand.unit', next);
    clearBandErrors();
  };
  const invalid = (field: string) => (get(formState.errors, field) ? true : undefined);
  return (
    <fieldset data-testid="limited-band">
      <legend className="field-label mb-1">Band to balance on</legend>
      {seed ? (
        <p className="mb-2 text-sm" data-testid="limited-band-seed">
          Started from the acceptance band of the controller project <a href={`/projects/${seed.projectSlug}`}>{seed.projectName}</a>:{' '}
          {formatFrequency(seed.minFrequency, timeBase)} to {formatFrequency(seed.maxFrequency, timeBase)}.
        </p>
      ) : null}
      <div className="grid gap-4 md:grid-cols-3">
        <Field htmlFor={`${id}-fl-lo`} label="From">
          <input
            id={`${id}-fl-lo`}
            className="field-input num"
            {...field('limitedBand.from', { onChange: clearBandErrors })}
            inputMode="decimal"
            placeholder="e.g. 0"
            aria-invalid={invalid('recipe.limitedBand.minFrequency')}
            disabled={!canRun}
          />
          <FieldMessage field="recipe.limitedBand.minFrequency" />
        </Field>
        <Field htmlFor={`${id}-fl-hi`} label="To">
          <input
            id={`${id}-fl-hi`}
            className="field-input num"
            {...field('limitedBand.to', { onChange: clearBandErrors })}
            inputMode="decimal"
            placeholder="e.g. 50"
            aria-invalid={invalid('recipe.limitedBand.maxFrequency')}
            disabled={!canRun}
          />
          <FieldMessage field="recipe.limitedBand.maxFrequency" />
        </Field>
        <Field htmlFor={`${id}-fl-unit`} label="Unit">
          <select id={`${id}-fl-unit`} className="field-input" value={unitChosen} onChange={(e) => switchUnit(e.target.value as BandUnit)} disabled={!canRun}>
            <option value="rad">{unit}</option>
            {timeBaseSeconds !== null ? <option value="hz">{hzLabel}</option> : null}
          </select>
          <FieldMessage field="recipe.limitedBand.unit" />
        </Field>
      </div>
      <FieldMessage field="recipe.limitedBand" />
      <p className="mt-1 text-xs text-graphite-soft">
        0 ≤ from &lt; to. The gramians are restricted to the frequencies inside the band (Gawronski &amp; Juang 1990); the poles&apos; band is{' '}
        {formatFrequency(analysis.frequencyBand[0], timeBase)} to {formatFrequency(analysis.frequencyBand[1], timeBase)}.
      </p>
    </fieldset>
  );
}

/** The order: by number on the slider, or by tolerance (not for frequency-limited balanced truncation). */
function OrderFields({
  id,
  analysis,
  method,
  selection,
  order,
  onOrder,
  timeBase,
  canRun,
  table,
}: { id: string; table: OrderFigureTable | null } & RecipeFormProps) {
  const { register } = useFormContext<RecipeFormValues>();
  const field = useField();
  const orderRule = useWatch<RecipeFormValues, 'orderRule'>({ name: 'orderRule' });
  const tolerance = useWatch<RecipeFormValues, 'tolerance'>({ name: 'tolerance' });
  const limited = method === 'frequency-limited';
  const toleranceValue = typedNumber(tolerance);
  const available = table?.available ? table : null;
  const byTolerance = available && toleranceValue ? orderForTolerance(available, toleranceValue, analysis.stablePartHInfinityNorm) : null;
  return (
    <fieldset>
      <legend className="field-label mb-1">Order</legend>
      {limited ? (
        <p className="mb-3 text-sm">By number of states (the method has no bound for a tolerance to meet).</p>
      ) : (
        <div role="radiogroup" aria-label="Order rule" className="mb-3 flex flex-wrap gap-4 text-sm">
          <label className="flex items-center gap-2">
            <input type="radio" value="order" {...register('orderRule')} defaultChecked={orderRule === 'order'} />
            By number of states
          </label>
          <label className="flex items-center gap-2">
            <input type="radio" value="tolerance" {...register('orderRule')} defaultChecked={orderRule === 'tolerance'} />
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
            onChange={onOrder}
            figures={table.figures}
            fullOrder={analysis.states}
            timeBase={timeBase}
            disabled={!canRun}
            noBoundNote={limited ? `${NO_BOUND_SENTENCE} Stiffness and step limits are shown on the result page, since the reduced poles depend on the band.` : undefined}
          />
          {table.limitNote ? <p className="mt-1 text-xs text-graphite-soft">{table.limitNote}</p> : null}
          <FieldMessage field="recipe.order" />
        </>
      ) : (
        <div className="max-w-md">
          <label htmlFor={`${id}-tolerance`} className="field-label">
            Tolerance (relative to ‖G‖∞)
          </label>
          <input id={`${id}-tolerance`} className="field-input num" {...field('tolerance')} inputMode="decimal" />
          <FieldMessage field="recipe.tolerance" />
          <p className="mt-1 text-sm" aria-live="polite">
            {byTolerance
              ? `Order ${byTolerance.order}: bound ${formatNumber(byTolerance.bound)} ≤ ${formatNumber(toleranceValue! * (analysis.stablePartHInfinityNorm ?? 0))}`
              : 'No order on the slider meets it; the reduction will search the larger orders.'}
          </p>
        </div>
      )}
    </fieldset>
  );
}

/** The optional acceptance band: the controller team's limit on |G − Gr| over a frequency range. */
function AcceptanceFields({ id, analysis, timeBase }: { id: string; analysis: AnalysisRecord; timeBase: string }) {
  const { register } = useFormContext<RecipeFormValues>();
  const field = useField();
  const withAcceptance = useWatch<RecipeFormValues, 'withAcceptance'>({ name: 'withAcceptance' });
  const unit = frequencyUnit(timeBase);
  return (
    <fieldset>
      <label className="flex items-center gap-2 text-sm">
        <input type="checkbox" {...register('withAcceptance')} defaultChecked={withAcceptance} />
        Acceptance band: the controller team&apos;s limit on |G − Gr| over a frequency range
      </label>
      {withAcceptance ? (
        <div className="mt-2 grid gap-4 md:grid-cols-3">
          <Field htmlFor={`${id}-acc-lo`} label={`From (${unit})`}>
            <input id={`${id}-acc-lo`} className="field-input num" {...field('acceptance.from')} inputMode="decimal" />
          </Field>
          <Field htmlFor={`${id}-acc-hi`} label={`To (${unit})`}>
            <input id={`${id}-acc-hi`} className="field-input num" {...field('acceptance.to')} inputMode="decimal" />
            <FieldMessage field="recipe.acceptance.maxFrequency" />
          </Field>
          <Field htmlFor={`${id}-acc-max`} label="Largest error">
            <input id={`${id}-acc-max`} className="field-input num" {...field('acceptance.maxError')} inputMode="decimal" />
            <FieldMessage field="recipe.acceptance.maxError" />
          </Field>
          <p className="text-xs text-graphite-soft md:col-span-3">
            The poles&apos; band is {formatFrequency(analysis.frequencyBand[0], timeBase)} to {formatFrequency(analysis.frequencyBand[1], timeBase)}; the error is
            checked on a dense grid inside the band.
          </p>
        </div>
      ) : null}
    </fieldset>
  );
}

/** Where the result goes: a new reduced model (named here), or the next version of one made from this source. */
function TargetFields({ id, reducedModels }: { id: string; reducedModels: ReducedModelChoice[] }) {
  const field = useField();
  const target = useWatch<RecipeFormValues, 'target'>({ name: 'target' });
  return (
    <fieldset>
      <legend className="field-label mb-1">Register the result as</legend>
      <div className="grid gap-4 md:grid-cols-2">
        <Field htmlFor={`${id}-target`} label="Reduced model">
          <select id={`${id}-target`} className="field-input" {...field('target')}>
            <option value="new">A new reduced model</option>
            {reducedModels.map((m) => (
              <option key={m.id} value={m.id}>
                {m.name}: next version after v{m.latestVersion}
              </option>
            ))}
          </select>
        </Field>
        {target === 'new' ? (
          <Field htmlFor={`${id}-name`} label="Name of the new reduced model">
            <input id={`${id}-name`} className="field-input" {...field('name')} maxLength={120} />
            <FieldMessage field="target.name" />
          </Field>
        ) : null}
      </div>
      {target === 'new' ? (
        <div className="mt-3">
          <label htmlFor={`${id}-description`} className="field-label">
            What it is for
          </label>
          <input id={`${id}-description`} className="field-input" {...field('description')} maxLength={4000} />
        </div>
      ) : null}
    </fieldset>
  );
}
