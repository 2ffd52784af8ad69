// Reduced models and their numbered versions, by concern: what a request accepts (schemas.ts, browser-safe),
// the requests that start work (requests.ts), the registration of a finished reduction (registration.ts), the
// reads behind the pages (queries.ts), where a version's page is (paths.ts) and the table rows (rows.ts).
// Status changes after draft (review, approval, retirement) live in lib/review/.
export * from '@/lib/reduced-models/schemas';
export * from '@/lib/reduced-models/requests';
export * from '@/lib/reduced-models/registration';
export * from '@/lib/reduced-models/queries';
export * from '@/lib/reduced-models/paths';
export * from '@/lib/reduced-models/rows';
