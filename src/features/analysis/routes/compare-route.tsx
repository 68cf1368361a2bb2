import { CompareScreen } from '../components/compare-screen';

export const Component = CompareScreen;
