// POST: the "submit" transition of lib/review/state-machine.ts, with { note } (lib/review/transition-route.ts).
import { transitionRoute } from '@/lib/review/transition-route';

export const POST = transitionRoute('submit');
