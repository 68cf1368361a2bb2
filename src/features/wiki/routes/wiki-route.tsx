import { WikiScreen } from '../components/wiki-screen';

export const Component = WikiScreen;
