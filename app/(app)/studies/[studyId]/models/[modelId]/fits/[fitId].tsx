import { FitScreen } from '../../../../../../../features/models/FitScreen';

export default FitScreen;
