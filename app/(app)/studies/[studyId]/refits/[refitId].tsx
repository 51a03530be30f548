import { RefitScreen } from '../../../../../features/refits/RefitScreen';

export default RefitScreen;
