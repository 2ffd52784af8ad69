'use client';
// The recipe form's field groups (RecipeForm.tsx holds them under one react-hook-form FormProvider): method
// and modal rule (held by the workspace), the modal band, the band of frequency-limited balanced truncation,
// the order, the acceptance band and the target. Each reads and registers its fields through the form
// context, and shows the message of the request field it is about (recipe-form-schema.ts).
import { type ReactNode } from 'react';
import { get, useFormContext, useWatch, type Path } from 'react-hook-form';
import { formatFrequency, formatNumber, frequencyUnit } from '@/lib/format';
import { OrderSlider } from '@/components/workspace/OrderSlider';
import type { AnalysisRecord, OrderFigureTable } from '@/lib/engine-tasks/records';
import type { ProjectBandSeed } from '@/lib/reduced-models/queries';
import { orderByNumberOnly, orderForTolerance, type BandUnit, type Method, type ModalSelection } from './recipe-choices';
import { typedNumber, type RecipeFormValues } from './recipe-form-schema';
import { methodChoiceLabel } from '@/lib/recipe-words';
import { RECIPE_METHODS } from '@/lib/reduced-models/schemas';

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


/** Shown instead of the bound column, and on the result page. */
export const NO_BOUND_SENTENCE =
  'Frequency-limited balanced truncation has no a-priori error bound: the error inside and outside the band is measured once the reduction has run, and the reduced model may even be unstable (its stability is reported).';

export const shortNumber = (x: number) => String(Number(x.toPrecision(6)));

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
export function MethodFields({ id, analysis, method, onMethod, selection, onSelection, canRun }: { id: string } & RecipeFormProps) {
  return (
    <div className="grid gap-4 md:grid-cols-2">
      <Field htmlFor={`${id}-method`} label="Method">
        <select id={`${id}-method`} className="field-input" value={method} onChange={(e) => onMethod(e.target.value as Method)} disabled={!canRun}>
          {RECIPE_METHODS.map((m) => (
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
            {analysis.path === 'sparse' ? null : <option value="band">Inside a frequency band</option>}
          </select>
        </Field>
      ) : null}
    </div>
  );
}

/** Modal truncation's band rule: the band whose modes are kept. */
export function ModalBandFields({ id, timeBase, statesInBand }: { id: string; timeBase: string; statesInBand: number | null }) {
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
export function LimitedBandFields({ id, analysis, timeBase, timeBaseSeconds, seed, canRun }: { id: string } & RecipeFormProps) {
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
        {(
          [
            ['lo', 'From', 'limitedBand.from', 'e.g. 0', 'recipe.limitedBand.minFrequency'],
            ['hi', 'To', 'limitedBand.to', 'e.g. 50', 'recipe.limitedBand.maxFrequency'],
          ] as const
        ).map(([edge, label, name, placeholder, errorField]) => (
          <Field key={edge} htmlFor={`${id}-fl-${edge}`} label={label}>
            <input
              id={`${id}-fl-${edge}`}
              className="field-input num"
              {...field(name, { onChange: clearBandErrors })}
              inputMode="decimal"
              placeholder={placeholder}
              aria-invalid={invalid(errorField)}
              disabled={!canRun}
            />
            <FieldMessage field={errorField} />
          </Field>
        ))}
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
export function OrderFields({
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
  const numberOnly = orderByNumberOnly(analysis, method);
  const toleranceValue = typedNumber(tolerance);
  const available = table?.available ? table : null;
  const byTolerance = available && toleranceValue ? orderForTolerance(available, toleranceValue, analysis.stablePartHInfinityNorm) : null;
  return (
    <fieldset>
      <legend className="field-label mb-1">Order</legend>
      {numberOnly ? (
        <p className="mb-3 text-sm">
          {limited || method === 'irka'
            ? 'By number of states (the method has no bound for a tolerance to meet).'
            : 'By number of states: on the large-model path each order’s bound is an estimate over the leading Hankel singular values, shown beside the slider.'}
        </p>
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
      ) : orderRule === 'order' || numberOnly ? (
        <>
          <OrderSlider
            orders={table.orders}
            value={order}
            onChange={onOrder}
            figures={table.figures}
            fullOrder={analysis.states}
            timeBase={timeBase}
            disabled={!canRun}
            noBoundNote={
              limited
                ? `${NO_BOUND_SENTENCE} Stiffness and step limits are shown on the result page, since the reduced poles depend on the band.`
                : method === 'irka'
                  ? 'IRKA has no a-priori error bound: the error is measured against the full model once the reduction has run, and the reduced model’s stability is reported.'
                  : undefined
            }
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
export function AcceptanceFields({ id, analysis, timeBase }: { id: string; analysis: AnalysisRecord; timeBase: string }) {
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
export function TargetFields({ id, reducedModels }: { id: string; reducedModels: ReducedModelChoice[] }) {
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
