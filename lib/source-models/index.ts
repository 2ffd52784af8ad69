// Source models and their numbered versions, by concern: what the upload form and the list accept
// (schemas.ts, browser-safe), the rows and views (rows.ts), the upload and its registration
// (registration.ts), the source-model list (list.ts) and the reads behind the pages and jobs (queries.ts).
export * from '@/lib/source-models/schemas';
export * from '@/lib/source-models/rows';
export * from '@/lib/source-models/registration';
export * from '@/lib/source-models/list';
export * from '@/lib/source-models/queries';
