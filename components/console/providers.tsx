"use client";

import { MutationCache, QueryCache, QueryClient, QueryClientProvider } from "@tanstack/react-query";
import { useState, type ReactNode } from "react";
import { signInUrl } from "@/lib/console-client/fetcher";
import { isProblem } from "@/lib/console-client/problem";
import { ReauthProvider } from "./reauth-dialog";

/** A session that ended while the console was open: go to sign-in and come back here afterwards. */
function onSessionLost(err: unknown) {
  if (isProblem(err, 401) && typeof window !== "undefined") window.location.assign(signInUrl());
}

/** Refusals (4xx) are answers, not glitches: only network failures and 5xx are retried. */
function retry(count: number, err: unknown): boolean {
  if (isProblem(err) && err.status >= 400 && err.status < 500) return false;
  return count < 2;
}

export function ConsoleProviders({ children }: { children: ReactNode }) {
  const [client] = useState(
    () =>
      new QueryClient({
        queryCache: new QueryCache({ onError: onSessionLost }),
        mutationCache: new MutationCache({ onError: onSessionLost }),
        defaultOptions: {
          queries: { retry, staleTime: 20_000, refetchOnWindowFocus: false },
          mutations: { retry: false },
        },
      }),
  );
  return (
    <QueryClientProvider client={client}>
      <ReauthProvider>{children}</ReauthProvider>
    </QueryClientProvider>
  );
}
