import { queryOptions } from '@tanstack/react-query';
import { api } from '../api-client';
import { verificationResponseSchema } from '../../../shared/schemas/findings';
import { queryKeys } from './keys';

// Signature verification is shown by the findings screens and by wiki pages alike.

/** Recomputes a signed finding's hash on the server; never cached as fresh, every check is a new one. */
export const verificationQuery = (findingId: number) =>
  queryOptions({
    queryKey: [...queryKeys.findings.all, 'verify', findingId] as const,
    queryFn: async () => (await api.get(`/findings/${findingId}/verify`, verificationResponseSchema)).verification,
    enabled: false,
    staleTime: 0,
    gcTime: 0,
  });
