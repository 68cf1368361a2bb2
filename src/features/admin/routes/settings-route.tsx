import type { QueryClient } from '@tanstack/react-query';
import { SettingsScreen } from '../components/settings-screen';
import { settingsQuery } from '../../../lib/queries/settings';

export const Component = SettingsScreen;

export function prefetch(qc: QueryClient): void {
  void qc.prefetchQuery(settingsQuery());
}
