// Liveness of what the web server needs: the database answers a trivial query. The health route
// (app/api/health/route.ts) and the start and test scripts ask it; DEVELOPERS.md keeps db() out of route
// handlers, so the query lives here.
import { db } from '@/lib/db';

/** True when PostgreSQL answers `select 1`, false on any error (refused connection, timeout, bad login). */
export async function databaseAnswers(): Promise<boolean> {
  try {
    await db().raw('select 1');
    return true;
  } catch {
    return false;
  }
}
