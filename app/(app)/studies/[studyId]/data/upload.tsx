import { UploadScreen } from '../../../../../features/data/UploadScreen';

export default UploadScreen;
