// Every test process starts with the after-commit mail round off (lib/notifications/sender.ts): a review
// transition in one test file would otherwise start a round that claims and sends the mail another file is
// waiting for, over that process's SMTP settings. Tests of the mail run their rounds themselves.
import { setAfterCommitDelivery } from '@/lib/notifications/sender';

setAfterCommitDelivery(false);
