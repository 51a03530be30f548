import { BatchScreen } from '../../../../../features/batches/BatchScreen';

export default BatchScreen;
