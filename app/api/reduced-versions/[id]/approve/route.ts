// POST: the "approve" transition of lib/review/state-machine.ts, with { comment } (lib/review/transition-route.ts).
import { transitionRoute } from '@/lib/review/transition-route';

export const POST = transitionRoute('approve');
