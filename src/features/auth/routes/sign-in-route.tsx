import { SignInScreen } from '../components/sign-in-screen';

export const Component = SignInScreen;
