import { InboxScreen } from '../../features/board/InboxScreen';

export default InboxScreen;
