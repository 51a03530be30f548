import { InvitationScreen } from '../../../features/invitations/InvitationScreen';

export default InvitationScreen;
