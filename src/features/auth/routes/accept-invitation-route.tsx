import { AcceptInvitationScreen } from '../components/password-screens';

export const Component = AcceptInvitationScreen;
