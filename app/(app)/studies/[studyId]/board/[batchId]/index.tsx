import { BoardScreen } from '../../../../../../features/board/BoardScreen';

export default BoardScreen;
