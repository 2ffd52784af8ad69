// What the upload form and the source-model list accept: one base schema, the create and version forms
// derived from it (STYLE.md), and the list's sort, filter and page. Browser-safe: no database here.
import { z } from 'zod';

const tagList = z
  .string()
  .max(400, 'Tags must be at most 400 characters in all.')
  .transform((s) =>
    Array.from(
      new Set(
        s
          .split(',')
          .map((t) => t.trim().toLowerCase())
          .filter(Boolean),
      ),
    ),
  )
  .pipe(z.array(z.string().max(40, 'Each tag must be at most 40 characters.')).max(12, 'Give at most 12 tags.'));

const sourceModelBase = z.object({
  name: z.string({ error: 'Name is required.' }).trim().min(1, 'Name is required.').max(120, 'Name must be at most 120 characters.'),
  description: z.string().trim().max(4000, 'Description must be at most 4000 characters.').default(''),
  timeBase: z
    .string()
    .trim()
    .max(16, 'Time unit must be at most 16 characters.')
    .regex(/^[A-Za-zµ]*$/, 'Time unit must be a unit name such as s, ms or h.')
    .default(''),
  tags: tagList.default([]),
  notes: z.string().trim().max(2000, 'Notes must be at most 2000 characters.').default(''),
  sourceModelId: z.uuid({ error: 'The source model id must be a UUID.' }),
});

export const newSourceModelSchema = sourceModelBase.omit({ sourceModelId: true });
export const newVersionSchema = sourceModelBase.pick({ sourceModelId: true, notes: true });

export type NewSourceModelInput = z.infer<typeof newSourceModelSchema>;

export const SOURCE_MODEL_SORTS = ['name', 'latestVersion', 'states', 'inputs', 'outputs', 'stiffnessRatio', 'stable', 'uploadedBy', 'uploadedAt'] as const;
export type SourceModelSort = (typeof SOURCE_MODEL_SORTS)[number];

export const sourceModelListSchema = z.object({
  q: z.string().trim().max(100, 'The filter must be at most 100 characters.').default(''),
  stable: z.enum(['', 'yes', 'no'], { error: 'stable must be yes, no or empty.' }).default(''),
  sort: z.enum(SOURCE_MODEL_SORTS, { error: `sort must be one of ${SOURCE_MODEL_SORTS.join(', ')}.` }).default('uploadedAt'),
  dir: z.enum(['asc', 'desc'], { error: 'dir must be asc or desc.' }).default('desc'),
  page: z.coerce.number({ error: 'page must be a number.' }).int('page must be a whole number.').min(0, 'page must be 0 or more.').default(0),
  pageSize: z.coerce.number({ error: 'pageSize must be a number.' }).int('pageSize must be a whole number.').min(5, 'pageSize must be at least 5.').max(100, 'pageSize must be at most 100.').default(20),
});
export type SourceModelListQuery = z.infer<typeof sourceModelListSchema>;
