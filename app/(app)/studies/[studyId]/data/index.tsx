import { WavesScreen } from '../../../../../features/data/WavesScreen';

export default WavesScreen;
