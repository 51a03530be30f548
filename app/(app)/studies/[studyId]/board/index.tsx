import { BoardIndexScreen } from '../../../../../features/board/BoardIndexScreen';

export default BoardIndexScreen;
