"use client";

import { QueryClient, QueryClientProvider } from "@tanstack/react-query";
import { LiveUpdates } from "@/components/live/live-updates";
import { useState } from "react";

export type QueryProviderProps = { children: React.ReactNode };

/** One query cache per page visit; the floor and the tables refetch when the window regains focus. */
export function QueryProvider({ children }: QueryProviderProps) {
  const [client] = useState(
    () =>
      new QueryClient({
        defaultOptions: {
          queries: { staleTime: 5_000, refetchOnWindowFocus: true, retry: 1 },
        },
      }),
  );
  return (
    <QueryClientProvider client={client}>
      <LiveUpdates />
      {children}
    </QueryClientProvider>
  );
}
