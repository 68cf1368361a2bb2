import { PreferencesScreen } from '../components/preferences-screen';

export const Component = PreferencesScreen;
