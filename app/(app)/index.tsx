import { StudiesScreen } from '../../features/studies/StudiesScreen';

export default StudiesScreen;
