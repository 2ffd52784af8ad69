// Runs notification delivery outside the transactions that queue it. One round: queue the "upstream
// changed" mails for source versions registered since the last round (upstream-notices.ts) and the pin
// notices to controller project members (pin-notices.ts), then send what is due (queue.ts).
//
// Two callers: the request that queued mail kicks a round right after its transaction commits, so mail is
// prompt without waiting for a poll; the worker (scripts/worker.ts) runs rounds on an interval, which
// retries failures and picks up source versions registered by any process. Rounds in one process never
// overlap; rounds in several processes are safe because mail rows are claimed with SKIP LOCKED.
import { DELIVERY_BATCH, deliverDueMail, type DeliveryReport } from '@/lib/notifications/queue';
import { queueUpstreamNotices } from '@/lib/notifications/upstream-notices';
import { queuePinNotices } from '@/lib/notifications/pin-notices';

export interface RoundReport extends DeliveryReport {
  upstreamNotices: number;
  /** Mails to controller project members about their pins (pin-notices.ts). */
  pinNotices: number;
}

let running: Promise<RoundReport> | null = null;
let again = false;

/** One round now; a call while a round runs waits for it and then runs one more, so nothing is missed. */
export async function runNotificationRound(): Promise<RoundReport> {
  if (running) {
    again = true;
    return running;
  }
  running = (async () => {
    const total: RoundReport = { upstreamNotices: 0, pinNotices: 0, sent: 0, retrying: 0, gaveUp: 0 };
    do {
      again = false;
      total.upstreamNotices += await queueUpstreamNotices();
      total.pinNotices += (await queuePinNotices()).queued;
      let claimed: number;
      do {
        const delivered = await deliverDueMail({ limit: DELIVERY_BATCH });
        total.sent += delivered.sent;
        total.retrying += delivered.retrying;
        total.gaveUp += delivered.gaveUp;
        claimed = delivered.sent + delivered.retrying + delivered.gaveUp;
      } while (claimed === DELIVERY_BATCH);
    } while (again);
    return total;
  })().finally(() => {
    running = null;
  });
  return running;
}

let afterCommitDelivery = true;

/**
 * Turns the after-commit round off or on for this process (on by default). Tests of the queue turn it off
 * so that only their explicit rounds send, as when no server process runs beside the worker.
 */
export function setAfterCommitDelivery(enabled: boolean): void {
  afterCommitDelivery = enabled;
}

/** Starts a round after the current request's work, without making the request wait or fail for it. */
export function kickNotificationSender(): void {
  if (!afterCommitDelivery) return;
  setImmediate(() => {
    runNotificationRound().catch((err) => console.error('[modeshelf] notification round failed', err));
  });
}

/** The worker's loop: a round every `intervalMs`. Returns a stop function that waits for the last round. */
export function startNotificationSender(intervalMs = 5_000): () => Promise<void> {
  let stopped = false;
  let timer: NodeJS.Timeout | null = null;
  const tick = async () => {
    try {
      const report = await runNotificationRound();
      if (report.sent + report.retrying + report.gaveUp + report.upstreamNotices > 0) {
        console.log(
          `[modeshelf] notifications: ${report.upstreamNotices} upstream notice(s), ${report.sent} sent, ${report.retrying} to retry, ${report.gaveUp} given up`,
        );
      }
    } catch (err) {
      console.error('[modeshelf] notification round failed', err);
    }
    if (!stopped) timer = setTimeout(tick, intervalMs);
  };
  timer = setTimeout(tick, 0);
  return async () => {
    stopped = true;
    if (timer) clearTimeout(timer);
    if (running) await running.catch(() => undefined);
  };
}
