import { NewFindingScreen } from '../components/new-finding-screen';

export const Component = NewFindingScreen;
