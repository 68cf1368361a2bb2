import { ForgotPasswordScreen } from '../components/password-screens';

export const Component = ForgotPasswordScreen;
