import { NewBatchScreen } from '../../../../../features/batches/NewBatchScreen';

export default NewBatchScreen;
