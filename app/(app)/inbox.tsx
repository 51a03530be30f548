import { InboxScreen } from '../../features/inbox/InboxScreen';

export default InboxScreen;
