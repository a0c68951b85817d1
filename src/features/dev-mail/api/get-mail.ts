import { queryOptions, useQuery } from '@tanstack/react-query';
import { callRoute } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** Messages captured by the local fake SMTP server (development and tests only). */
export async function getMail(to: string) {
  const { messages } = await callRoute('devMail', { query: { to: to || undefined, limit: 100 } });
  return messages;
}

export const mailQueryOptions = (to: string) =>
  queryOptions({ queryKey: queryKeys.devMail(to), queryFn: () => getMail(to), refetchInterval: 4000 });

export function useMail(to: string) {
  return useQuery(mailQueryOptions(to));
}
