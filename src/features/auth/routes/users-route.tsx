import type { QueryClient } from '@tanstack/react-query';
import { UsersScreen } from '../components/users-screen';
import { usersQuery } from '../api/auth-queries';

export const Component = UsersScreen;

export function prefetch(qc: QueryClient): void {
  void qc.prefetchQuery(usersQuery({ sort: 'name' }));
}
