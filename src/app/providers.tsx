import { useEffect, type ReactNode } from "react";
import { QueryClientProvider, type QueryClient } from "@tanstack/react-query";
import { setUnauthorizedHandler } from "../lib/api.ts";
import { sessionKeys } from "../lib/session.ts";

/** Query cache and the 401 rule: a lost session clears the cache; the session guard then shows Sign in. */
export function AppProviders({ client, children }: { client: QueryClient; children: ReactNode }) {
  useEffect(() => {
    setUnauthorizedHandler(() => {
      client.removeQueries({ predicate: (q) => q.queryKey[0] !== sessionKeys.all[0] });
      client.setQueryData(sessionKeys.me(), null);
    });
    return () => setUnauthorizedHandler(null);
  }, [client]);
  return <QueryClientProvider client={client}>{children}</QueryClientProvider>;
}
