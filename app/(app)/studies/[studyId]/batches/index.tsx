import { BatchListScreen } from '../../../../../features/batches/BatchListScreen';

export default BatchListScreen;
