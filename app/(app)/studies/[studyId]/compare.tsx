import { CompareScreen } from '../../../../features/compare/CompareScreen';

export default CompareScreen;
