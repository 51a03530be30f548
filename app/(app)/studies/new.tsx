import { NewStudyScreen } from '../../../features/studies/NewStudyScreen';

export default NewStudyScreen;
