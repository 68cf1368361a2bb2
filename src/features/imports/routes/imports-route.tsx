import { ImportsScreen } from '../components/imports-screen';

export const Component = ImportsScreen;
