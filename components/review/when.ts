/** A moment as the shelf writes it: ISO date and minutes, in UTC, e.g. "2026-12-01 14:05 UTC". */
export function formatWhen(iso: string): string {
  return `${iso.replace('T', ' ').slice(0, 16)} UTC`;
}
