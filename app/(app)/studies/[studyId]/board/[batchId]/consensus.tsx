import { ConsensusScreen } from '../../../../../../features/consensus/ConsensusScreen';

export default ConsensusScreen;
