import { ModelListScreen } from '../../../../../features/models/ModelListScreen';

export default ModelListScreen;
