// Review of reduced-model versions, by concern: the life itself (state-machine.ts, pure and browser-safe;
// import it directly), what the routes accept (schemas.ts), the reads behind the Reviews page and a
// version's review sheet (queries.ts), the transitions, comments and next drafts applied to the database
// (transitions.ts), and the one handler of the four transition routes (transition-route.ts).
export * from '@/lib/review/schemas';
export * from '@/lib/review/queries';
export * from '@/lib/review/transitions';
