/** One TanStack Query client per page, shared by the islands on it. */
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import type { ComponentType } from 'react';

let client: QueryClient | null = null;
function getClient(): QueryClient {
  client ??= new QueryClient({ defaultOptions: { queries: { staleTime: 10_000, retry: 1, refetchOnWindowFocus: false } } });
  return client;
}

export function withQuery<P extends object>(Inner: ComponentType<P>): ComponentType<P> {
  const Wrapped = (props: P) => (
    <QueryClientProvider client={getClient()}>
      <Inner {...props} />
    </QueryClientProvider>
  );
  Wrapped.displayName = `withQuery(${Inner.displayName ?? Inner.name})`;
  return Wrapped;
}
