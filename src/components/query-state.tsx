import type { ReactNode } from 'react';
import type { UseQueryResult } from '@tanstack/react-query';
import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { LoadingBlock } from '@/components/ui/spinner';
import { errorMessage } from '@/lib/api-client';

/** Loading and error states of one query, then its data. */
export function QueryState<T>({
  query,
  loadingLabel,
  errorTitle = 'Could not load this',
  children,
}: {
  query: UseQueryResult<T>;
  loadingLabel?: string;
  errorTitle?: string;
  children: (data: T) => ReactNode;
}) {
  if (query.isPending) return <LoadingBlock label={loadingLabel} />;
  if (query.isError)
    return (
      <Banner
        tone="notice"
        title={errorTitle}
        action={
          <Button variant="secondary" size="sm" pending={query.isFetching} onClick={() => void query.refetch()}>
            Try again
          </Button>
        }
      >
        {errorMessage(query.error)}
      </Banner>
    );
  return <>{children(query.data)}</>;
}
