import { FindingsScreen } from '../components/findings-screen';

export const Component = FindingsScreen;
