import { dehydrate, QueryClient, type DehydratedState } from '@tanstack/react-query';

/**
 * For server pages: the data they have just read through the DAL, put under the keys of the query
 * factories (lib/client/<resource>.ts) and dehydrated for a <HydrationBoundary>, so that the client
 * island's useQuery starts from it instead of fetching it again first. Newer than anything a client
 * cached on an earlier visit, it replaces that.
 *
 *   <HydrationBoundary state={dehydrated((qc) => qc.setQueryData(datasetsQuery().queryKey, datasets))}>
 */
export function dehydrated(fill: (client: QueryClient) => void): DehydratedState {
  const client = new QueryClient();
  fill(client);
  return dehydrate(client);
}
