import { RefitListScreen } from '../../../../../features/refits/RefitListScreen';

export default RefitListScreen;
