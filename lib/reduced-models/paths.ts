// Where a reduced-model version's page is: a pure function, shared by the pages, the review queue and the job
// result a finished reduction hands back.

export function reducedVersionPath(slug: string, number: number): string {
  return `/reduced-models/${slug}/versions/${number}`;
}
