import { LineupScreen } from '../../../../../../../features/lineups/LineupScreen';

export default LineupScreen;
