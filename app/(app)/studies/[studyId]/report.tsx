import { ReportScreen } from '../../../../features/report/ReportScreen';

export default ReportScreen;
