import { ModelFormScreen } from '../../../../../../features/models/ModelFormScreen';

export default ModelFormScreen;
