import { QueryClientProvider, type QueryClient } from '@tanstack/react-query';
import { useEffect, useState, type ReactNode } from 'react';
import { ApiError, onGlobalApiError } from '../lib/api-client';
import { queryKeys } from '../lib/queries/keys';

export function AppProvider({ client, children }: { client: QueryClient; children: ReactNode }) {
  const [serverError, setServerError] = useState<ApiError | null>(null);
  useEffect(
    () =>
      onGlobalApiError((err) => {
        // 401: the session ended (signed out elsewhere, disabled, expired) — the layout sends the user to sign-in.
        if (err.status === 401) client.setQueryData(queryKeys.session.me(), null);
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
