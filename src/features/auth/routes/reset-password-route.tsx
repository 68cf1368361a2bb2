import { ResetPasswordScreen } from '../components/password-screens';

export const Component = ResetPasswordScreen;
