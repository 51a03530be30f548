import { TeamScreen } from '../../../../features/team/TeamScreen';

export default TeamScreen;
