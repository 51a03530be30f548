import { PlaybackScreen } from '../../../../../../features/explore/PlaybackScreen';

export default PlaybackScreen;
