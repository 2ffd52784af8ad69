// Pins (README.md, "Pull API"), by concern: what the routes accept (schemas.ts), how a pin resolves to a
// version (resolution.ts, pure), the reads (queries.ts) and the changes (changes.ts).
export * from '@/lib/pins/schemas';
export * from '@/lib/pins/resolution';
export * from '@/lib/pins/queries';
export * from '@/lib/pins/changes';
