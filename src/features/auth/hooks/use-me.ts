import { useQuery } from '@tanstack/react-query';
import { meQuery } from '../api/auth-queries';

/** The signed-in user (undefined while loading, null when signed out). */
export function useMe() {
  return useQuery(meQuery()).data;
}
