import { ChoiceScreen } from '../../../../../../features/explore/ChoiceScreen';

export default ChoiceScreen;
