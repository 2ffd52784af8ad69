// Notification mail, in one folder: who wants which mail (preferences.ts), the queue written inside the
// transaction of a change and delivered after it commits (queue.ts), the wording (mail.ts), the pin notices
// to controller project members (pin-notices.ts), the "upstream changed" sweep (upstream-notices.ts), and the
// round that runs them after a request and in the worker (sender.ts).
export * from '@/lib/notifications/preferences';
export * from '@/lib/notifications/queue';
export * from '@/lib/notifications/mail';
export * from '@/lib/notifications/pin-notices';
export * from '@/lib/notifications/upstream-notices';
export * from '@/lib/notifications/sender';
