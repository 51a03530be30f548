import { ModelScreen } from '../../../../../../features/models/ModelScreen';

export default ModelScreen;
