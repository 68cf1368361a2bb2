import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { useEffect, useState, type ReactNode } from 'react';
import { ApiError, onGlobalApiError } from '../lib/api-client';

function makeClient() {
  return new QueryClient({
    defaultOptions: {
      queries: {
        // A 4xx will not get better by asking again.
        retry: (count, err) => !(err instanceof ApiError && err.status >= 400 && err.status < 500) && count < 2,
        refetchOnWindowFocus: false,
      },
    },
  });
}

export function AppProvider({ children }: { children: ReactNode }) {
  const [client] = useState(makeClient);
  const [serverError, setServerError] = useState<ApiError | null>(null);
  useEffect(
    () =>
      onGlobalApiError((err) => {
        // 401: the session ended (signed out elsewhere, disabled, expired) — the layout sends the user to sign-in.
        if (err.status === 401) client.setQueryData(['auth', 'me'], null);
        else setServerError(err);
      }),
    [client],
  );
  return (
    <QueryClientProvider client={client}>
      {serverError && (
        <div role="alert" className="no-print bg-margin px-4 py-2 text-sm text-white">
          {serverError.message}
          {serverError.requestId && <span> (request {serverError.requestId})</span>}
          <button type="button" className="ml-3 underline" onClick={() => setServerError(null)}>
            Dismiss
          </button>
        </div>
      )}
      {children}
    </QueryClientProvider>
  );
}
