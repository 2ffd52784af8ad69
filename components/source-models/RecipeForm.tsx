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
// The fields are groups on react-hook-form (recipe-fields.tsx), validated on submit with recipe-form-schema.ts
// (the form's own checks, then the server's request schema) through @hookform/resolvers; a message stays
// beside its field until the next submit (a band's until that band is edited). Method, modal rule and order
// belong to the workspace (the charts follow them) and reach the validation as the form's context.
import { useRouter } from 'next/navigation';
import { useEffect, useId, useState } from 'react';
import { FormProvider, useForm, useWatch, type FieldErrors } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { useMutation, useQuery } from '@tanstack/react-query';
import { apiFetch, ApiClientError } from '@/components/api-client';
import type { OrderFigureTable } from '@/lib/engine-tasks/records';
import type { JobView } from '@/lib/jobs/jobs';
import type { ReductionRequest } from '@/lib/reduced-models/schemas';
import { JobProgress } from './JobProgress';
import { orderByNumberOnly, storedTable, suggestedOrder } from './recipe-choices';
import { modalBand, recipeFormSchema, type RecipeFormContext, type RecipeFormValues } from './recipe-form-schema';
import {
  AcceptanceFields,
  LimitedBandFields,
  MethodFields,
  ModalBandFields,
  OrderFields,
  shortNumber,
  TargetFields,
  type RecipeFormProps,
  type RecipeSource,
} from './recipe-fields';
import { METHOD_NAMES } from '@/lib/recipe-words';

export type { RecipeFormProps, RecipeSource } from './recipe-fields';

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

export function RecipeForm(p: RecipeFormProps) {
  const { analysis, method, selection, order, timeBase } = p;
  const router = useRouter();
  const id = useId();
  const [job, setJob] = useState<JobView | null>(null);
  const context: RecipeFormContext = {
    sourceVersionId: p.sourceVersionId,
    method,
    selection,
    order,
    hzAllowed: p.timeBaseSeconds !== null,
    numberOnly: orderByNumberOnly(analysis, method),
  };
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
