// POST: the "retire" transition of lib/review/state-machine.ts, with { reason } (lib/review/transition-route.ts).
import { transitionRoute } from '@/lib/review/transition-route';

export const POST = transitionRoute('retire');
