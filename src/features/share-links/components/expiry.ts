/** Choices for a share link's lifetime, turned into the ISO timestamp the API expects (or null). */
export const EXPIRY_CHOICES = [
  { value: 'never', label: 'Never expires' },
  { value: '1d', label: 'Expires in 24 hours' },
  { value: '7d', label: 'Expires in 7 days' },
  { value: '30d', label: 'Expires in 30 days' },
  { value: 'date', label: 'Expires on a date…' },
] as const;
export type ExpiryChoice = (typeof EXPIRY_CHOICES)[number]['value'];

const DAY = 86_400_000;

/**
 * `date` is a calendar day (yyyy-mm-dd) from a date input; the link lasts until the end of that
 * day in the viewer's time zone. Returns undefined when the date is missing or not a date.
 */
export function expiryToIso(choice: ExpiryChoice, date: string | undefined, now: Date = new Date()): string | null | undefined {
  switch (choice) {
    case 'never':
      return null;
    case '1d':
      return new Date(now.getTime() + DAY).toISOString();
    case '7d':
      return new Date(now.getTime() + 7 * DAY).toISOString();
    case '30d':
      return new Date(now.getTime() + 30 * DAY).toISOString();
    case 'date': {
      if (!date || !/^\d{4}-\d{2}-\d{2}$/.test(date)) return undefined;
      const [y, m, d] = date.split('-').map(Number);
      const end = new Date(y, m - 1, d, 23, 59, 59);
      return Number.isNaN(end.getTime()) ? undefined : end.toISOString();
    }
  }
}
