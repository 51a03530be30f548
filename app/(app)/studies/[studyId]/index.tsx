import { StudyOverviewScreen } from '../../../../features/studies/StudyOverviewScreen';

export default StudyOverviewScreen;
