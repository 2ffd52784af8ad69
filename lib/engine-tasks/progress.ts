// How an engine task says how far it is: the stage in words (shown under the progress bar) and the
// fraction of the whole task done, 0..1. Tasks call it between engine calls; the thread host forwards it.
export type ProgressReporter = (stage: string, fraction: number) => void;
