import { queryOptions, useQuery } from '@tanstack/react-query';
import { callRoute } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** Messages captured by the local fake SMTP server (development and tests only). */
/** Messages and whether they are all of them ('all', with this start's key) or only the caller's own. */
export async function getMail(to: string) {
  const { messages, scope } = await callRoute('devMail', { query: { to: to || undefined, limit: 100 } });
  return Object.assign(messages, { scope: scope ?? 'all' });
}

export const mailQueryOptions = (to: string) =>
  queryOptions({ queryKey: queryKeys.devMail(to), queryFn: () => getMail(to), refetchInterval: 4000 });

export function useMail(to: string) {
  return useQuery(mailQueryOptions(to));
}
